"""Errors and warnings carry their data (issue 11, contract A): field, value, model key."""

from __future__ import annotations

import pickle
import warnings

import numpy as np
import pytest

import rheoline
from rheoline import errors
from rheoline.errors import (
    InputRangeError,
    OutputError,
    PackExistsError,
    RangeWarning,
    RegimeWarning,
    RheolineError,
    ScenarioError,
    UnitError,
)


def test_every_exception_class_lives_in_errors_and_is_a_rheoline_error():
    for name in errors.__all__:
        cls = getattr(errors, name)
        assert cls.__module__ == "rheoline.errors"
        if issubclass(cls, Exception) and not issubclass(cls, Warning):
            assert issubclass(cls, RheolineError) and issubclass(cls, ValueError)
            err = cls("message", field="f", value=3)
            assert (err.field, err.value) == ("f", 3)


def test_old_import_paths_still_work():
    from rheoline.scenario.export import OutputError as OutputFromExport
    from rheoline.scenario.export import PackExistsError as PackFromExport
    from rheoline.scenario.files import OutputError as OutputFromFiles

    assert OutputFromExport is OutputFromFiles is OutputError
    assert PackFromExport is PackExistsError
    assert issubclass(OutputError, OSError) and issubclass(OutputError, ScenarioError)


def test_scenario_error_keeps_source_scenario_field_and_message_shape():
    err = ScenarioError("bad", source="x.toml", scenario="'s'", field="part[2].length", value=-1)
    assert str(err) == "x.toml, scenario 's', field 'part[2].length': bad"
    assert (err.source, err.scenario, err.field, err.value) == (
        "x.toml",
        "'s'",
        "part[2].length",
        -1,
    )
    again = pickle.loads(pickle.dumps(err))
    assert str(again) == str(err) and again.field == "part[2].length" and again.source == "x.toml"


def test_output_error_keeps_its_reason():
    err = OutputError("cannot write: disk full", source="/tmp/x", reason="disk full")
    assert err.reason == "disk full" and err.source == "/tmp/x"
    assert str(err) == "/tmp/x: cannot write: disk full"


def test_model_checks_name_the_field_and_value():
    with pytest.raises(InputRangeError, match="hematocrit must be a fraction") as info:
        rheoline.fluid("whole-blood", hematocrit=45)
    assert info.value.field == "hematocrit" and info.value.value == 45.0
    with pytest.raises(InputRangeError, match="inner_diameter must be greater than 0") as info:
        rheoline.Tube(inner_diameter=-1e-3, length=1.0)
    assert info.value.field == "inner_diameter" and info.value.value == -1e-3


def test_unit_error_carries_field_kind_and_unit():
    from rheoline.units import parse_quantity

    with pytest.raises(UnitError, match="is not a unit of pressure") as info:
        parse_quantity("3 m", "pressure", field="head")
    err = info.value
    assert (err.field, err.kind, err.unit) == ("head", "pressure", "m")
    with pytest.raises(UnitError, match="has no unit") as info:
        parse_quantity("3", "pressure", field="source_pressure")
    assert info.value.field == "source_pressure" and info.value.value == "3"


def test_range_warning_names_the_registry_model_and_range():
    with pytest.warns(RangeWarning, match="outside the validated range 0..100 degC") as caught:
        rheoline.fluid("water", temperature_c=np.array([20.0, 110.0]))
    w = caught[0].message
    assert w.model in rheoline.model.provenance.REGISTRY
    assert w.quantity == "temperature_c" and (w.low, w.high) == (0.0, 100.0)
    assert w.outside.tolist() == [False, True]


def test_regime_warning_carries_its_numbers():
    from rheoline.model.vessels import Vessel

    v = Vessel(radius=5e-3, length=0.1, viscosity_law="newtonian", viscosity=3.5e-3)
    with pytest.warns(RegimeWarning, match="Reynolds number") as caught:
        v.flow(5000.0)
    w = caught[0].message
    assert w.model == "hagen-poiseuille" and w.quantity == "reynolds" and w.value > w.limit


def test_warnings_without_data_still_construct():
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        warnings.warn("plain", RangeWarning, stacklevel=1)
    assert caught[0].message.model is None and caught[0].message.quantity is None
