"""The blood and vessel view: blood viscosity, the Fahraeus-Lindqvist curve, vessel
resistance against radius, and a vascular resistance calculator.

Every number comes from the model layer (:func:`rheoline.blood_viscosity`,
:func:`rheoline.pries_1992_relative_viscosity`, :class:`rheoline.Vessel`,
:mod:`rheoline.model.hemodynamics`); this module only picks the grids, converts
units for display and draws.

Examples
--------
>>> view = BloodVesselView()
>>> sorted(view.figures)
['fahraeus', 'resistance', 'viscosity']
"""

from __future__ import annotations

import ipywidgets as widgets
import numpy as np

import rheoline
from rheoline.model import hemodynamics
from rheoline.units import MMHG
from rheoline.widgets.base import _STYLE, View, labelled
from rheoline.widgets.figures import curve_and_point_figure
from rheoline.widgets.style import flag_html, format_number, significant

__all__ = ["BloodVesselView", "VISCOSITY_AXES"]

#: One mmHg min/mL in Pa s/m^3: the unit the view shows a vessel's resistance in.
_MMHG_MIN_PER_ML = MMHG * 60.0 / 1e-6
#: A slider as wide as its column, so a step of the hematocrit is a few pixels, not one.
_SLIDER = widgets.Layout(width="auto", max_width="560px")

#: x-axis choices of the blood viscosity chart: label -> (control name, grid, axis title, log axis)
VISCOSITY_AXES = {
    "hematocrit": ("hematocrit", np.linspace(0.0, 0.7, 71), "hematocrit [-]", False),
    "temperature": ("temperature_c", np.linspace(4.0, 40.0, 73), "temperature [degC]", False),
    "shear rate": ("shear_rate", np.geomspace(1.0, 1000.0, 61), "shear rate [1/s]", True),
}
#: Diameters of the Fahraeus-Lindqvist curve [m]: inside Pries 1992's fitted 3.3-1978 um.
FAHRAEUS_DIAMETERS = np.geomspace(4e-6, 1.9e-3, 120)
#: Radii of the resistance chart [m]: 2 um to 0.95 mm.
RESISTANCE_RADII = np.geomspace(2e-6, 0.95e-3, 120)


class BloodVesselView(View):
    """Blood viscosity, the Fahraeus-Lindqvist curve, vessel resistance and SVR/PVR.

    Parameters
    ----------
    hematocrit : float
        Starting hematocrit [-].
    temperature_c : float
        Starting temperature [degC].
    shear_rate : float
        Starting shear rate [1/s] of the viscosity chart.
    lazy : bool
        Keep the charts as plain figures until :meth:`show_figures` (the app does this for
        tabs not yet opened).
    """

    title = "Blood and vessels"

    def __init__(
        self,
        hematocrit: float = 0.45,
        temperature_c: float = 37.0,
        shear_rate: float = 100.0,
        lazy: bool = False,
    ):
        super().__init__()
        c = self.controls
        c["hematocrit"] = labelled(
            widgets.FloatSlider(
                value=hematocrit,
                min=0.0,
                max=0.7,
                step=0.01,
                description="hematocrit [-]",
                layout=_SLIDER,
                continuous_update=False,
                style=_STYLE,
            ),
            "rl-hematocrit",
        )
        c["temperature_c"] = labelled(
            widgets.FloatSlider(
                value=temperature_c,
                min=4.0,
                max=40.0,
                step=0.5,
                description="temperature [degC]",
                layout=_SLIDER,
                continuous_update=False,
                style=_STYLE,
            ),
            "rl-temperature",
        )
        c["shear_rate"] = labelled(
            widgets.FloatLogSlider(
                value=shear_rate,
                base=10,
                min=0,
                max=3,
                step=0.05,
                description="shear rate [1/s]",
                layout=_SLIDER,
                continuous_update=False,
                style=_STYLE,
            ),
            "rl-shear-rate",
        )
        c["axis"] = labelled(
            widgets.ToggleButtons(
                options=list(VISCOSITY_AXES),
                value="hematocrit",
                description="viscosity against",
                style=_STYLE,
            ),
            "rl-axis",
        )
        c["vessel_length_mm"] = labelled(
            widgets.BoundedFloatText(
                value=1.0, min=0.001, max=1e4, description="vessel length [mm]", style=_STYLE
            ),
            "rl-vessel-length",
        )
        c["vessel_radius_um"] = labelled(
            widgets.BoundedFloatText(
                value=50.0, min=2.0, max=950.0, description="vessel radius [um]", style=_STYLE
            ),
            "rl-vessel-radius",
        )
        # calculator
        c["bed"] = widgets.ToggleButtons(
            options=["systemic", "pulmonary"],
            value="systemic",
            description="vascular bed",
            style=_STYLE,
        )
        c["upstream_mmhg"] = widgets.BoundedFloatText(
            value=90.0, min=-50, max=400, description="upstream (MAP or mPAP) [mmHg]", style=_STYLE
        )
        c["downstream_mmhg"] = widgets.BoundedFloatText(
            value=6.0,
            min=-50,
            max=400,
            description="downstream (CVP or wedge) [mmHg]",
            style=_STYLE,
        )
        c["cardiac_output_l_min"] = widgets.BoundedFloatText(
            value=5.0,
            min=0.0,
            max=50.0,
            step=0.1,
            description="cardiac output [L/min]",
            style=_STYLE,
        )
        c["height_cm"] = widgets.BoundedFloatText(
            value=170.0, min=30, max=250, description="height [cm]", style=_STYLE
        )
        c["weight_kg"] = widgets.BoundedFloatText(
            value=70.0, min=1, max=400, description="weight [kg]", style=_STYLE
        )
        self.calculator_output = labelled(widgets.HTML(), "rl-resistance-result")
        self.point_output = labelled(widgets.HTML(), "rl-blood-point")

        self.figures["viscosity"] = curve_and_point_figure(
            "Blood viscosity",
            "blood viscosity",
            "current inputs",
            yaxis=dict(title="viscosity [mPa s]"),
        )
        self.figures["fahraeus"] = curve_and_point_figure(
            "Fahraeus-Lindqvist: apparent viscosity against diameter",
            "Pries 1992 (in vitro)",
            "vessel diameter",
            xaxis=dict(title="diameter [um]", type="log"),
            yaxis=dict(title="relative apparent viscosity [-]"),
        )
        self.figures["resistance"] = curve_and_point_figure(
            "Resistance of one vessel against radius",
            "vessel resistance",
            "vessel radius",
            xaxis=dict(title="radius [um]", type="log"),
            yaxis=dict(title="resistance [mmHg min/mL]", type="log"),
        )

        everything = {"viscosity", "fahraeus", "resistance", "point"}
        self._watch(
            {
                "hematocrit": everything,
                "temperature_c": {"viscosity", "resistance", "point"},
                "shear_rate": {"viscosity", "point"},
                "axis": {"viscosity"},
                "vessel_length_mm": {"resistance", "point"},
                "vessel_radius_um": {"fahraeus", "resistance", "point"},
                **{
                    k: {"calculator"}
                    for k in (
                        "bed",
                        "upstream_mmhg",
                        "downstream_mmhg",
                        "cardiac_output_l_min",
                        "height_cm",
                        "weight_kg",
                    )
                },
            }
        )
        self._run(lambda: self._refresh(everything | {"calculator"}))
        self._widgetize(lazy)

        inputs = [
            widgets.HTML("<b>Blood</b>"),
            c["hematocrit"],
            c["temperature_c"],
            c["shear_rate"],
            c["axis"],
            widgets.HTML("<b>One vessel</b>"),
            c["vessel_radius_um"],
            c["vessel_length_mm"],
            widgets.HTML("<b>Vascular resistance from measurements</b>"),
            c["bed"],
            c["upstream_mmhg"],
            c["downstream_mmhg"],
            c["cardiac_output_l_min"],
            c["height_cm"],
            c["weight_kg"],
        ]
        outputs = [
            self.point_output,
            self.calculator_output,
            self.figure_box("viscosity"),
            self.figure_box("fahraeus"),
            self.figure_box("resistance"),
        ]
        self._finish([self.two_columns(inputs, outputs)])

    # -- values from the layers ----------------------------------------------------
    def _inputs(self):
        c = self.controls
        return (c["hematocrit"].value, c["temperature_c"].value, c["shear_rate"].value)

    def viscosity_curve(self):
        """(x grid, blood viscosity [Pa s]) of the chart at the current inputs."""
        hematocrit, temperature_c, shear_rate = self._inputs()
        name, grid, _, _ = VISCOSITY_AXES[self.controls["axis"].value]
        args = {"hematocrit": hematocrit, "temperature_c": temperature_c, "shear_rate": shear_rate}
        args[name] = grid
        return grid, rheoline.blood_viscosity(
            args["hematocrit"], args["temperature_c"], args["shear_rate"]
        )

    def vessel(self, radius=None):
        """The :class:`rheoline.Vessel` at the current inputs (``radius`` [m] may be a grid)."""
        c = self.controls
        if radius is None:
            radius = c["vessel_radius_um"].value * 1e-6
        return rheoline.Vessel(
            radius=radius,
            length=c["vessel_length_mm"].value * 1e-3,
            hematocrit=c["hematocrit"].value,
            temperature_c=c["temperature_c"].value,
        )

    # -- drawing -------------------------------------------------------------------
    def _refresh(self, parts):
        c = self.controls
        hematocrit, temperature_c, shear_rate = self._inputs()
        radius = c["vessel_radius_um"].value * 1e-6
        if "viscosity" in parts:
            grid, mu = self.viscosity_curve()
            name, _, axis_title, log = VISCOSITY_AXES[c["axis"].value]
            here = {
                "hematocrit": hematocrit,
                "temperature_c": temperature_c,
                "shear_rate": shear_rate,
            }[name]
            here_mu = rheoline.blood_viscosity(hematocrit, temperature_c, shear_rate)
            fig = self.figures["viscosity"]
            with fig.batch_update():
                fig.data[0].x, fig.data[0].y = grid, np.asarray(mu) * 1e3
                fig.data[1].x, fig.data[1].y = [here], [here_mu * 1e3]
                fig.layout.xaxis.title.text = axis_title
                fig.layout.xaxis.type = "log" if log else "linear"
        if "fahraeus" in parts:
            rel = rheoline.pries_1992_relative_viscosity(FAHRAEUS_DIAMETERS, hematocrit)
            here = rheoline.pries_1992_relative_viscosity(2 * radius, hematocrit)
            fig = self.figures["fahraeus"]
            with fig.batch_update():
                fig.data[0].x, fig.data[0].y = FAHRAEUS_DIAMETERS * 1e6, rel
                fig.data[1].x, fig.data[1].y = [2 * c["vessel_radius_um"].value], [here]
        if "resistance" in parts:
            to_display = 1.0 / _MMHG_MIN_PER_ML
            curve = self.vessel(RESISTANCE_RADII).resistance
            here = self.vessel(radius).resistance
            fig = self.figures["resistance"]
            with fig.batch_update():
                fig.data[0].x, fig.data[0].y = RESISTANCE_RADII * 1e6, curve * to_display
                fig.data[1].x = [c["vessel_radius_um"].value]
                fig.data[1].y = [here * to_display]
        if "point" in parts:
            mu = rheoline.blood_viscosity(hematocrit, temperature_c, shear_rate)
            rel = rheoline.pries_1992_relative_viscosity(2 * radius, hematocrit)
            vessel = self.vessel(radius)
            self.point_output.value = (
                f"blood viscosity {format_number(mu * 1e3, 'mPa s')} at "
                f"{significant(shear_rate)} 1/s; apparent viscosity in a "
                f"{significant(2 * radius * 1e6)} um tube {significant(rel)} x plasma "
                f"(Pries 1992); vessel resistance "
                f"{significant(vessel.resistance / _MMHG_MIN_PER_ML)} mmHg min/mL"
            )
        if "calculator" in parts:
            self._calculate()

    def _calculate(self):
        c = self.controls
        systemic = c["bed"].value == "systemic"
        up, down = c["upstream_mmhg"].value, c["downstream_mmhg"].value
        flow = c["cardiac_output_l_min"].value
        bsa = hemodynamics.body_surface_area(c["height_cm"].value, c["weight_kg"].value)
        if systemic:
            result = hemodynamics.systemic_vascular_resistance(up, down, flow)
            indexed = hemodynamics.systemic_vascular_resistance_index(up, down, flow, bsa)
        else:
            result = hemodynamics.pulmonary_vascular_resistance(up, down, flow)
            indexed = hemodynamics.pulmonary_vascular_resistance_index(up, down, flow, bsa)
        name = "SVR" if systemic else "PVR"
        self.calculator_output.value = (
            f"<div class='rl-resistance'>{name} "
            f"<span class='rl-wood'>{significant(result.wood_units)} WU</span> "
            f"(mmHg min/L) = {significant(result.dyn_s_per_cm5)} dyn s cm^-5; "
            f"body surface area {significant(bsa)} m^2 (Mosteller 1987); "
            f"{name}I {significant(indexed.wood_units)} WU m^2 = "
            f"{significant(indexed.dyn_s_per_cm5)} dyn s cm^-5 m^2</div>"
            + flag_html(
                "note",
                "computed from the pressures, flow, height and weight entered; "
                "the view judges no result as high or low",
            )
        )
