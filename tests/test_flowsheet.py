"""Flowsheets with recycle: gibbsmin's converged loop against an independent successive-substitution solve with
Cantera and thermo (tests/loop_reference.py), the flowsheet certificate, design specifications and bad input."""

import dataclasses
import math
import warnings

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from loop_reference import REFERENCE_LOOP, converged_reference

from gibbsmin.case.spec import Stage
from gibbsmin.errors import ConvergenceError, InputError
from gibbsmin.flowsheet import DesignSpecification, Flowsheet, Material, settle_flowsheet
from gibbsmin.flowsheet.units import (
    ComponentSplitter,
    Context,
    FluidModel,
    Mixer,
    Reactor,
    Separator,
    Splitter,
)

SPECIES = REFERENCE_LOOP["species"]
CONTEXT = Context.of(species=SPECIES, frozen=("CH4", "Ar"))
PR = FluidModel("peng-robinson")


def reference_flowsheet(purge: float = 0.04, converter_T: float = 743.15, separator_T: float = 253.15,
                        specifications=()) -> Flowsheet:
    """REFERENCE_LOOP built from gibbsmin's units (the same numbers the reference reads)."""
    ops = {op["name"]: op for op in REFERENCE_LOOP["operations"]}
    makeup = REFERENCE_LOOP["boundary_in"]["makeup"]
    feed = Material(makeup["T"], makeup["P"], {s: y * makeup["total"] for s, y in makeup["mole_fractions"].items()})
    conv, sep = ops["converter"], ops["separator"]
    units = (
        Mixer("loop mixer", ("makeup", "recycle"), ("converter feed",)),
        Reactor("converter", ("converter feed",), ("converter out",), stage=Stage("converter", converter_T, conv["P"])),
        Separator("separator", ("converter out",), ("separator vapour", "product"), T=separator_T, P=sep["P"],
                  model=PR),
        Splitter("purge split", ("separator vapour",), ("purge", "recycle"), fraction=purge),
    )
    return Flowsheet("reference loop", {"makeup": feed}, units, tuple(specifications))


@pytest.fixture(scope="module")
def settled():
    return settle_flowsheet(reference_flowsheet(), CONTEXT)


def test_every_stream_matches_the_independent_loop(settled):
    # Reference: successive substitution to 1e-12 with Cantera 3.2's TP equilibrium for the converter and
    # thermo 0.6's PR78MIX flash for the separator (tests/loop_reference.py names both and what they get).
    reference = converged_reference()
    for name, flows in reference.streams.items():
        ours = settled.streams[name]
        total = sum(flows.values())
        for species, n in flows.items():
            # 1e-6 of the species' own flow (the issue's tolerance), or of 1e-6 of the stream where it is a trace.
            assert ours.flows.get(species, 0.0) == pytest.approx(n, rel=1e-6, abs=1e-12 * total), (name, species)
        assert ours.P == pytest.approx(reference.P[name], rel=1e-12)
        if reference.T[name] is not None:
            assert ours.T == pytest.approx(reference.T[name], rel=1e-12)


def test_the_loop_converges_in_far_fewer_passes_than_substitution(settled):
    # The reference's successive substitution takes 461 passes to 1e-12 (tests/loop_reference.py).
    assert settled.certificate.passes * 5 <= converged_reference().passes
    assert settled.structure.tears == ("recycle",)


def test_certificate_of_the_converged_loop(settled):
    c = settled.certificate
    assert c.certified and c.converged
    assert c.tear_residual <= 1e-8
    assert c.element_balance_residual <= 1e-9
    assert c.uncertified_units == ()
    assert set(settled.structure.boundary_out) == {"product", "purge"}


def test_boundary_balance_by_hand(settled):
    # The makeup's elements leave in the product and the purge (the loop's mass balance; common practice, no source).
    s = settled.streams
    for species in ("CH4", "Ar"):  # inert: each leaves exactly as fed
        assert s["product"].flows[species] + s["purge"].flows[species] == pytest.approx(
            s["makeup"].flows[species], rel=1e-9)
    nitrogen_in = 2 * s["makeup"].flows["N2"]
    nitrogen_out = sum(2 * s[n].flows.get("N2", 0.0) + s[n].flows.get("NH3", 0.0) for n in ("product", "purge"))
    assert nitrogen_out == pytest.approx(nitrogen_in, rel=1e-9)


def test_design_specification_holds_the_inerts_at_the_converter_inlet():
    spec = DesignSpecification("inerts", "converter feed", "fraction", ("CH4", "Ar"), 0.10, "purge split",
                               "fraction", 0.005, 0.3)
    result = settle_flowsheet(reference_flowsheet(specifications=(spec,)), CONTEXT)
    assert result.streams["converter feed"].fraction(("CH4", "Ar")) == pytest.approx(0.10, rel=1e-9)
    assert 0.005 < result.settings["inerts"] < 0.04  # more inerts than at a 4 % purge: a smaller purge
    assert result.certificate.certified


def test_the_makeup_rate_that_gives_a_stated_production():
    spec = DesignSpecification("production", "product", "flow", ("NH3",), 300.0, "makeup", "flow", 100.0, 5000.0)
    result = settle_flowsheet(reference_flowsheet(specifications=(spec,)), CONTEXT)
    assert result.streams["product"].flows["NH3"] == pytest.approx(300.0, rel=1e-9)
    # The loop is linear in its make-up at fixed fractions: 448.86 mol/s of NH3 from 1000 mol/s (the reference).
    expected = 1000.0 * 300.0 / converged_reference().streams["product"]["NH3"]
    assert result.settings["production"] == pytest.approx(expected, rel=1e-6)


def test_a_specification_out_of_reach_names_its_range():
    spec = DesignSpecification("inerts", "converter feed", "fraction", ("CH4", "Ar"), 0.60, "purge split",
                               "fraction", 0.01, 0.3)
    with pytest.raises(InputError, match="between 0.01 and 0.3"):
        settle_flowsheet(reference_flowsheet(specifications=(spec,)), CONTEXT)


def test_an_inert_with_no_way_out_is_refused_before_iterating():
    # With the ideal gas the separator's liquid is water alone, so Ar (and CH4) could leave only by a purge.
    sheet = reference_flowsheet()
    units = list(sheet.units)
    units[2] = dataclasses.replace(units[2], model=FluidModel())
    units[3] = Mixer("recycle line", ("separator vapour",), ("recycle",))
    sheet = dataclasses.replace(sheet, units=tuple(units))
    with pytest.raises(InputError, match="Ar enters the recycle.*add a purge"):
        settle_flowsheet(sheet, CONTEXT)


@pytest.mark.parametrize("change, message", [
    (lambda u: u[:3] + (Splitter("purge split", ("separator vapour",), ("purge", "recycle 2"), fraction=0.04),),
     "takes stream 'recycle', which no unit makes"),
    (lambda u: u + (Splitter("second", ("product",), ("purge", "x"), fraction=0.5),), "outlet of both"),
    (lambda u: (Mixer("loop mixer", ("makeup", "recycle"), ("recycle",)),) + u[1:], "takes its own outlet"),
    (lambda u: u + (Mixer("again", ("separator vapour",), ("y",)),), "taken by both"),
])
def test_bad_connections_are_named(change, message):
    sheet = reference_flowsheet()
    with pytest.raises(InputError, match=message):
        settle_flowsheet(dataclasses.replace(sheet, units=change(sheet.units)), CONTEXT)


def test_a_separator_with_nothing_to_condense_gives_an_empty_liquid_and_a_note():
    gas = Material(313.15, 30e5, {"H2": 70.0, "N2": 30.0})
    sheet = Flowsheet("dry", {"gas": gas}, (Separator("drum", ("gas",), ("vapour", "liquid"), model=PR),))
    with pytest.warns(UserWarning, match="nothing condenses"):
        result = settle_flowsheet(sheet, Context.of(species=("H2", "N2")))
    assert result.streams["liquid"].empty
    assert result.streams["vapour"].flows == pytest.approx(gas.flows, rel=1e-12)
    assert "nothing condenses" in result.outcomes["drum"].notes[0]


def test_a_component_splitter_takes_its_recoveries():
    gas = Material(313.15, 30e5, {"H2": 60.0, "CO2": 20.0, "N2": 20.0})
    sheet = Flowsheet("removal", {"gas": gas},
                      (ComponentSplitter("CO2 removal", ("gas",), ("CO2 out", "treated"), recovery={"CO2": 0.99}),))
    result = settle_flowsheet(sheet, Context.of(species=("H2", "CO2", "N2")))
    assert result.streams["CO2 out"].flows == pytest.approx({"CO2": 19.8}, rel=1e-12)
    assert result.streams["treated"].flows["CO2"] == pytest.approx(0.2, rel=1e-9)
    assert result.certificate.element_balance_residual <= 1e-15


def test_a_loop_that_cannot_converge_in_its_passes_says_so():
    sheet = dataclasses.replace(reference_flowsheet(), max_passes=4)
    with pytest.raises(ConvergenceError, match="tear stream 'recycle' still changes"):
        settle_flowsheet(sheet, CONTEXT)


@settings(max_examples=6, deadline=None)
@given(purge=st.floats(0.01, 0.2), converter_T=st.floats(690.0, 790.0), separator_T=st.floats(240.0, 270.0))
def test_random_loops_converge_certified(purge, converter_T, separator_T):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        result = settle_flowsheet(reference_flowsheet(purge, converter_T, separator_T), CONTEXT)
    c = result.certificate
    assert c.certified
    assert c.tear_residual <= 1e-8 and c.element_balance_residual <= 1e-9
    product = result.streams["product"]
    assert product.flows["NH3"] / product.total > 0.9  # the liquid is ammonia (common practice, no source)
    assert not math.isnan(result.streams["recycle"].T)


def test_a_sweep_marks_each_point_and_warm_starts_its_neighbours():
    from gibbsmin.flowsheet.sweep import sweep_flowsheet

    axes = {"pressure": [170e5, 190e5], "purge split.fraction": [0.03, 0.05]}
    points = sweep_flowsheet(reference_flowsheet(), axes, CONTEXT)
    assert [p.values for p in points] == [{"pressure": P, "purge split.fraction": f}
                                          for P in (170e5, 190e5) for f in (0.03, 0.05)]
    assert all(p.converged and p.result.certificate.certified for p in points)
    at_reference = points[3].result  # 190 bar, but a 5 % purge: more purge, fewer inerts than at 4 %
    assert at_reference.streams["converter feed"].P == pytest.approx(190e5, rel=1e-12)
    inerts = [p.result.streams["converter feed"].fraction(("CH4", "Ar")) for p in points]
    assert inerts[0] > inerts[1] and inerts[2] > inerts[3]
    # A higher loop pressure condenses more ammonia at the same separator T (common practice, no source).
    assert points[2].result.streams["product"].flows["NH3"] > points[0].result.streams["product"].flows["NH3"]
    # The warm-started neighbour needs fewer passes than a cold start.
    cold = settle_flowsheet(reference_flowsheet(0.05), CONTEXT)
    assert points[3].result.certificate.passes < cold.certificate.passes
