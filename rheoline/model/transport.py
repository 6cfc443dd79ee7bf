r"""Drug transport through the volume a drug shares with its carrier: plug, laminar, dispersed.

A drug that joins a carrier at an injection port reaches the outlet only after the flow
has swept the volume between the port and the outlet.  The fraction :math:`F(w)` of a
step in concentration that has reached the outlet once a volume :math:`w` has flowed
through (the cumulative residence-volume distribution) depends on how the drug spreads:

* **plug flow**: :math:`F = 1` once :math:`w \ge V` (the delay is :math:`V/Q`);
* **laminar segregated flow** (Levenspiel 1999): each streamline keeps its
  velocity of the parabolic profile and radial diffusion is too slow to mix them,
  :math:`F(\theta) = 1 - 1/(4\theta^2)` for :math:`\theta = w/V \ge 1/2`, else 0; a series
  of lumens without mixing between them behaves as one tube of their total volume;
* **Taylor-Aris dispersion** (Taylor 1953, Aris 1956): where radial diffusion evens out the
  profile within the residence time the step spreads as axial dispersion with
  :math:`D_{eff} = D_m + \bar u^2 R^2 / (48 D_m)`; for the small dispersion numbers that go
  with it (:math:`D_{eff}/(\bar u L) \le 0.03`) the spread is Gaussian, with variance
  :math:`2 D_{eff} L / \bar u` in time, :math:`2 D_{eff} L A^2 / \bar u` in volume.

The choice, lumen by lumen, reads the radial diffusion number
:math:`N_r = D_m \tau / R^2 = \pi D_m L / Q` (residence time over the time scale of radial
diffusion; a non-circular lumen uses its flow area and hydraulic radius, an approximation).
Taylor (1953) states his result holds when :math:`L/\bar u \gg R^2/(3.8^2 D_m)`; "much
greater" is taken here as ten times, :math:`N_r \ge 10/3.83^2 = 0.68`
(:data:`TAYLOR_RADIAL_NUMBER`).  Below it the lumen is taken as segregated, which spreads
the drug most (diffusion only narrows the distribution), so its 90 % delay is an upper
bound.  Fittings and measured parts pass their volume as plug flow.  A path of several
lumens adds the dispersed lumens' variances and treats the segregated ones as one tube.

The flow may change in time: the distribution is applied in volume throughput, which is
exact for plug and segregated flow with a profile of constant shape; the dispersion is
evaluated at one reference flow.

Examples
--------
>>> levenspiel_laminar_fraction(1.0)            # one tube volume through: 75 % arrived
0.75
>>> round(levenspiel_laminar_fraction(0.5), 12), levenspiel_laminar_fraction(0.4)
(0.0, 0.0)
>>> round(taylor_aris_dispersion(1e-3, 0.5e-3, 1e-9) * 1e6, 3)        # mm^2/s
5.209
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.validation import check_nonnegative, check_positive

__all__ = [
    "TAYLOR_RADIAL_NUMBER",
    "TRANSPORT_MODELS",
    "levenspiel_laminar_fraction",
    "taylor_aris_dispersion",
    "radial_diffusion_number",
    "plug_flow_delay",
    "gaussian_dispersion_fraction",
    "TransportPath",
    "transport_path",
    "outlet_concentration",
]

#: Radial diffusion number D tau / R^2 from which Taylor-Aris dispersion is used: ten times
#: Taylor's (1953) bound 1/3.8^2 (3.8317 the first zero of J_1).
TAYLOR_RADIAL_NUMBER = 10.0 / 3.8317**2

#: Choices of the transport model: "auto" picks per lumen (see the module notes).
TRANSPORT_MODELS = ("auto", "plug", "laminar", "dispersion")

_HERMITE_X, _HERMITE_W = np.polynomial.hermite_e.hermegauss(64)
_HERMITE_W = _HERMITE_W / _HERMITE_W.sum()
#: Grid of the tabulated distribution, in volume over the path's volume, and its step.
_GRID_END = 6.0
_GRID_STEP = 1.0 / 1024.0


def _out(arr):
    arr = np.asarray(arr, dtype=float)
    return float(arr) if arr.ndim == 0 else arr


def levenspiel_laminar_fraction(theta):
    r"""Levenspiel's cumulative distribution of laminar segregated tube flow, F(theta) [-].

    :math:`F = 1 - 1/(4\theta^2)` for :math:`\theta \ge 1/2`, 0 before, with
    :math:`\theta` the throughput over the tube's volume (time over V/Q at a steady flow).

    References
    ----------
    Levenspiel, O., Chemical Reaction Engineering, 3rd ed., Wiley (1999)
    (convection model for laminar flow).

    Examples
    --------
    >>> levenspiel_laminar_fraction([0.5, 1.0, 2.0])
    array([0.    , 0.75  , 0.9375])
    """
    theta = np.asarray(theta, dtype=float)
    safe = np.where(theta >= 0.5, theta, 1.0)
    return _out(np.where(theta >= 0.5, 1.0 - 0.25 / (safe * safe), 0.0))


def taylor_aris_dispersion(mean_velocity, radius, diffusivity):
    r"""Effective axial dispersion [m^2/s] of Poiseuille flow, :math:`D_m + \bar u^2 R^2/(48 D_m)`.

    Taylor (1953) found :math:`\bar u^2 R^2 / (48 D_m)` (his :math:`k`, with
    :math:`\bar u` the mean velocity, half the centre-line velocity); Aris (1956) showed
    the molecular diffusivity adds.

    References
    ----------
    Taylor, G.I., "Dispersion of soluble matter in solvent flowing slowly through a tube",
    Proc. R. Soc. Lond. A 219 (1953) 186-203.
    Aris, R., "On the dispersion of a solute in a fluid flowing through a tube",
    Proc. R. Soc. Lond. A 235 (1956) 67-77.

    Examples
    --------
    >>> round(taylor_aris_dispersion(0.0, 1e-3, 1e-9), 12)        # no flow: molecular only
    1e-09
    """
    u = check_nonnegative("mean_velocity", mean_velocity, "m/s")
    r = check_positive("radius", radius, "m")
    d = check_positive("diffusivity", diffusivity, "m^2/s")
    return _out(d + u * u * r * r / (48.0 * d))


def radial_diffusion_number(length, flow, diffusivity):
    r"""Residence time over radial diffusion time, :math:`D_m \tau / R^2 = \pi D_m L / Q` [-].

    Examples
    --------
    >>> round(radial_diffusion_number(1.5, 1e-6 / 3600, 5e-10), 3)   # 1.5 m at 1 mL/h
    8.482
    """
    length = check_positive("length", length, "m")
    q = check_positive("flow", flow, "m^3/s")
    d = check_positive("diffusivity", diffusivity, "m^2/s")
    return _out(np.pi * d * length / q)


def plug_flow_delay(volume, flow):
    """Plug-flow delay [s], V / Q.

    Examples
    --------
    >>> plug_flow_delay(0.3e-6, 1e-6 / 3600)           # 0.3 mL at 1 mL/h: 18 minutes
    1080.0
    """
    return _out(check_nonnegative("volume", volume, "m^3") / check_positive("flow", flow, "m^3/s"))


def gaussian_dispersion_fraction(theta, dispersion_number):
    r"""Cumulative fraction of a step through a dispersed vessel, small dispersion [-].

    :math:`F = \Phi\big((\theta - 1)/\sqrt{2d}\big)`, :math:`d = D_{eff}/(\bar u L)`
    (Levenspiel 1999: the Gaussian form for small extents of dispersion).

    Examples
    --------
    >>> gaussian_dispersion_fraction(1.0, 0.01)
    0.5
    """
    from scipy.special import ndtr

    theta = np.asarray(theta, dtype=float)
    d = check_positive("dispersion_number", dispersion_number)
    return _out(ndtr((theta - 1.0) / np.sqrt(2.0 * d)))


@dataclass(frozen=True)
class TransportPath:
    """Residence-volume distribution of one path (fields have the scenario shape).

    Attributes
    ----------
    plug_volume : ndarray
        [m^3] passed as plug flow (fittings, measured parts; every part under ``"plug"``).
    segregated_volume : ndarray
        [m^3] of lumens in laminar segregated flow (one tube, Levenspiel).
    dispersed_volume, dispersed_variance : ndarray
        [m^3] of lumens in Taylor-Aris dispersion, and their summed variance [m^6].
    radial_number : ndarray
        (n_lumens, ...) radial diffusion number of each lumen of the path [-].
    dispersive : ndarray
        (n_lumens, ...) bool, True where Taylor-Aris is used.
    lumen_names : tuple of str
    model : str
        The choice asked for: one of :data:`TRANSPORT_MODELS`.
    """

    plug_volume: np.ndarray
    segregated_volume: np.ndarray
    dispersed_volume: np.ndarray
    dispersed_variance: np.ndarray
    radial_number: np.ndarray
    dispersive: np.ndarray
    lumen_names: tuple
    model: str

    @property
    def volume(self):
        """Total volume [m^3] of the path."""
        return self.plug_volume + self.segregated_volume + self.dispersed_volume

    @property
    def models_used(self):
        """Provenance keys of the distributions this path applies, in order."""
        keys = []
        if np.any(self.segregated_volume > 0) or self.model == "plug":
            keys.append("levenspiel-1999")
        if np.any(self.dispersed_volume > 0):
            keys += ["taylor-1953", "aris-1956"]
        return tuple(keys)

    def fraction(self, volume):
        """Cumulative fraction [-] of a step that has left after throughput ``volume`` [m^3]."""
        from scipy.special import ndtr

        w = np.asarray(volume, dtype=float) - self.plug_volume
        vs, md = self.segregated_volume, self.dispersed_volume
        sigma = np.sqrt(self.dispersed_variance)
        # pure dispersion: exact Gaussian; otherwise the Gaussian mixed over Hermite nodes
        safe_sigma = np.where(sigma > 0, sigma, 1.0)
        gauss = np.where(sigma > 0, ndtr((w - md) / safe_sigma), (w >= md) * 1.0)
        safe_vs = np.where(vs > 0, vs, 1.0)
        mixed = np.zeros(np.broadcast_shapes(w.shape, np.shape(vs)))
        for x, weight in zip(_HERMITE_X, _HERMITE_W, strict=True):
            mixed = mixed + weight * levenspiel_laminar_fraction((w - md - sigma * x) / safe_vs)
        return np.where(vs > 0, mixed, gauss)

    def tail(self, volume):
        """The distribution far beyond the path's volume: the segregated tail, else 1."""
        w = np.asarray(volume, dtype=float) - self.plug_volume - self.dispersed_volume
        vs = self.segregated_volume
        safe = np.where(w > 0, w, 1.0)
        return np.where((vs > 0) & (w > 0), 1.0 - vs * vs / (4.0 * safe * safe), 1.0)

    def tabulate(self):
        """The distribution on a grid of throughput over the path's volume, (n_grid, ...)."""
        z = np.arange(0.0, _GRID_END + _GRID_STEP / 2, _GRID_STEP)
        total = np.maximum(self.volume, 1e-300)
        shape = (-1,) + (1,) * np.ndim(total)
        return self.fraction(z.reshape(shape) * total)

    def choice(self):
        """Per scenario, the distribution applied (array of str, or str)."""
        seg = np.asarray(self.segregated_volume > 0)
        disp = np.asarray(self.dispersed_volume > 0)
        out = np.where(
            seg & disp, "taylor-aris + laminar", np.where(disp, "taylor-aris", "laminar")
        )
        out = np.where(~seg & ~disp, "plug", out)
        return str(out) if out.ndim == 0 else out


def transport_path(parts, flow, diffusivity, model="auto"):
    """The :class:`TransportPath` of parts in series at a reference ``flow`` [m^3/s].

    Parameters
    ----------
    parts : sequence of Part
        The parts from the port to the outlet (or to the next port).
    flow : float or array_like
        Reference flow [m^3/s] through them, > 0.
    diffusivity : float or array_like
        Molecular diffusivity of the drug in the carrier [m^2/s], > 0.
    model : str
        One of :data:`TRANSPORT_MODELS`: ``"auto"`` (per lumen by the radial diffusion
        number), or one model for every lumen.

    Examples
    --------
    >>> from rheoline.model.parts import Tube
    >>> path = transport_path([Tube(inner_diameter=1e-3, length=1.5)], 1e-6 / 3600, 5e-10)
    >>> path.choice(), round(float(path.radial_number[0]), 2)
    ('taylor-aris', 8.48)
    """
    if model not in TRANSPORT_MODELS:
        raise InputRangeError(
            f"transport model {model!r} is not known; choose one of {', '.join(TRANSPORT_MODELS)}",
            field="transport",
            value=model,
        )
    q = check_positive("flow", flow, "m^3/s")
    d_m = check_positive("diffusivity", diffusivity, "m^2/s")
    zero = np.zeros(np.broadcast_shapes(q.shape, d_m.shape))
    plug, seg, disp, var = zero.copy(), zero.copy(), zero.copy(), zero.copy()
    numbers, dispersive, names = [], [], []
    for part in parts:
        volume = np.asarray(part.internal_volume, dtype=float)
        if part.kind != "lumen" or model == "plug":
            plug = plug + volume
            continue
        radius = np.asarray(part.inner_diameter, dtype=float) / 2.0
        area = np.asarray(part.flow_area, dtype=float)
        n_r = d_m * (area * part.length / q) / (radius * radius)
        use = {"auto": n_r >= TAYLOR_RADIAL_NUMBER, "laminar": zero > 1, "dispersion": zero < 1}
        mask = use[model] & np.ones_like(zero, dtype=bool)
        u = q / area
        d_eff = d_m + u * u * radius * radius / (48.0 * d_m)
        disp = disp + np.where(mask, volume, 0.0)
        var = var + np.where(mask, 2.0 * d_eff * part.length * area * area / u, 0.0)
        seg = seg + np.where(mask, 0.0, volume)
        numbers.append(n_r * np.ones_like(zero))
        dispersive.append(mask)
        names.append(part.name)
    return TransportPath(
        plug_volume=plug,
        segregated_volume=seg,
        dispersed_volume=disp,
        dispersed_variance=var,
        radial_number=np.array(numbers).reshape((len(numbers), *zero.shape)),
        dispersive=np.array(dispersive, dtype=bool).reshape((len(numbers), *zero.shape)),
        lumen_names=tuple(names),
        model=model,
    )


def outlet_concentration(path, entry_volume, entry_concentration, exit_volume, offset=0.0):
    r"""Concentration leaving a path from the history entering it, in volume throughput.

    .. math:: c_{out}(W) = \sum_m \Delta c_m \, F(W - W_0 - w_m)

    with the entering concentration held piecewise constant between samples (the mean of
    the two ends), :math:`\Delta c_m` its jumps at the throughputs :math:`w_m`, and
    :math:`W_0` (``offset``) the liquid the path held at the start beyond its volume.

    Parameters
    ----------
    path : TransportPath
        With flat scenario fields, shape (N,).
    entry_volume, entry_concentration : ndarray
        (n_in, N) throughput [m^3] into the path and the concentration entering.
    exit_volume : ndarray
        (n_out, N) throughput [m^3] out of the path at which to evaluate.
    offset : float or ndarray
        (N,) [m^3].

    Returns
    -------
    ndarray
        (n_out, N) concentration leaving (units of the entering concentration).
    """
    w_in = np.maximum.accumulate(np.asarray(entry_volume, dtype=float), axis=0)
    c = np.asarray(entry_concentration, dtype=float)
    mids = np.concatenate([c[:1], 0.5 * (c[1:] + c[:-1])])
    jumps = np.diff(mids, axis=0, prepend=0.0)
    scale = max(float(np.max(np.abs(c))), 1e-300)
    keep = np.flatnonzero(np.any(np.abs(jumps) > 1e-9 * scale, axis=1))
    table = path.tabulate()  # (n_grid, N)
    total = np.maximum(path.volume, 1e-300)
    n_grid = table.shape[0]
    cols = np.arange(table.shape[1])
    out = np.zeros(np.shape(exit_volume))
    w_exit = np.asarray(exit_volume, dtype=float) - offset
    for m in keep:
        z = (w_exit - w_in[m]) / total / _GRID_STEP
        k = np.clip(z.astype(np.intp), 0, n_grid - 2)
        frac = np.clip(z - k, 0.0, 1.0)
        f = table[k, cols] * (1.0 - frac) + table[k + 1, cols] * frac
        f = np.where(z < 0, 0.0, np.where(z >= n_grid - 1, path.tail(w_exit - w_in[m]), f))
        out = out + jumps[m] * f
    return out
