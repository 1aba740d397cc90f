"""The loop summary of a converged flowsheet against hand balances of its own streams.

The loop is invented (an ammonia synthesis loop: make-up, mixer, equilibrium converter, a Peng-Robinson separator
at -20 degC, a 4 % purge); the checks are balances worked out here from the converged streams, independently of
summary.py's code paths (stoichiometry, atom counts, totals), to round-off.
"""

from __future__ import annotations

import dataclasses
import functools

import pytest

from gibbsmin.case.spec import Case, ReportSpec, SpeciesSpec, Stage
from gibbsmin.energy import mixture_enthalpy
from gibbsmin.errors import InputError
from gibbsmin.flowsheet import Flowsheet, Material, settle_flowsheet
from gibbsmin.flowsheet.summary import ALL_OUT_BASIS, LIQUID_BASIS, loop_summary
from gibbsmin.flowsheet.units import Context, Exchanger, FluidModel, Mixer, Reactor, Separator, Splitter
from gibbsmin.thermo import default_database

#: Invented make-up gas [mol/s] at 40 degC and 190 bar.
MAKEUP = {"H2": 740.0, "N2": 247.0, "CH4": 9.5, "Ar": 3.5}
PURGE_FRACTION = 0.04


@functools.lru_cache(maxsize=None)
def ammonia_loop():
    """The converged invented loop, its database and context (solved once per test session)."""
    db = default_database()
    case = Case("invented loop", (), SpeciesSpec(only=("H2", "N2", "NH3", "CH4", "Ar"), frozen=("CH4", "Ar")), (),
                ReportSpec())
    context = Context(case, db)
    units = (
        Mixer("loop mixer", ("makeup", "recycle"), ("converter feed",)),
        Reactor("converter", ("converter feed",), ("converter out",), stage=Stage("converter", 743.15, 190e5)),
        Separator("separator", ("converter out",), ("separator vapour", "product"), T=253.15, P=190e5,
                  model=FluidModel("peng-robinson")),
        Splitter("purge split", ("separator vapour",), ("purge", "recycle"), fraction=PURGE_FRACTION),
    )
    sheet = Flowsheet("Invented ammonia loop", {"makeup": Material(313.15, 190e5, dict(MAKEUP))}, units)
    return settle_flowsheet(sheet, context), db, context


@pytest.fixture(scope="module")
def loop():
    return ammonia_loop()


def test_production_is_the_liquid_ammonia_leaving(loop):
    result, db, context = loop
    s = loop_summary(result, db, context=context)
    streams = result.streams
    assert s.product == "NH3"
    assert s.production_basis == LIQUID_BASIS and s.product_streams == ("product",)
    assert streams["product"].liquid_fraction == 1.0
    assert s.production_mol_s == pytest.approx(streams["product"].flows["NH3"], rel=1e-12)
    assert s.product_elsewhere_mol_s == pytest.approx(streams["purge"].flows["NH3"], rel=1e-12)
    # Nitrogen atoms: what the make-up brings leaves as NH3 (product and purge) or as N2 (both outlets).
    n2_out = streams["product"].flows["N2"] + streams["purge"].flows["N2"]
    assert s.production_mol_s + s.product_elsewhere_mol_s + 2 * n2_out == pytest.approx(2 * MAKEUP["N2"], rel=1e-9)
    # The figure itself: about 449 mol/s (a sanity range for this invented loop, not a reference).
    assert 400.0 < s.production_mol_s < 494.0


def test_conversion_per_pass_of_hydrogen(loop):
    result, db, context = loop
    s = loop_summary(result, db, context=context)
    feed, out = result.streams["converter feed"].flows, result.streams["converter out"].flows
    assert s.key_reactant == "H2"  # N2 + 3 H2 = 2 NH3: H2 is consumed three times as fast as N2
    assert s.reactor_inlets == ("converter feed",)
    assert s.conversion_per_pass == pytest.approx((feed["H2"] - out["H2"]) / feed["H2"], rel=1e-12)
    # Stoichiometry: 3/2 H2 per NH3 made.
    assert s.conversion_per_pass == pytest.approx(1.5 * (out["NH3"] - feed["NH3"]) / feed["H2"], rel=1e-9)


def test_recycle_ratio_is_recycle_over_makeup(loop):
    result, db, context = loop
    s = loop_summary(result, db, context=context)
    recycle, makeup = result.streams["recycle"], result.streams["makeup"]
    assert s.recycle_streams == ("recycle",) and s.feed_streams == ("makeup",)
    assert s.recycle_ratio == pytest.approx(sum(recycle.flows.values()) / sum(MAKEUP.values()), rel=1e-12)
    assert s.recycle_ratio == pytest.approx(recycle.total / makeup.total, rel=1e-12)
    # The splitter sends 96 % of the separator's vapour back.
    vapour = result.streams["separator vapour"].total
    assert s.recycle_ratio == pytest.approx((1 - PURGE_FRACTION) * vapour / 1000.0, rel=1e-12)


def test_inerts_at_converter_inlet(loop):
    result, db, context = loop
    s = loop_summary(result, db, context=context)
    feed = result.streams["converter feed"].flows
    total = sum(feed.values())
    assert set(s.inerts) == {"CH4", "Ar"}
    assert s.inerts["Ar"] == pytest.approx(feed["Ar"] / total, rel=1e-12)
    assert s.inert_fraction == pytest.approx((feed["CH4"] + feed["Ar"]) / total, rel=1e-12)
    # Without the context the inerts are told by their unchanged flows over the converter: the same two here.
    plain = loop_summary(dataclasses.replace(result, context=None), db)
    assert set(plain.inerts) == {"CH4", "Ar"} and plain.inert_fraction == pytest.approx(s.inert_fraction, rel=1e-12)
    assert "no context" in plain.inert_basis


def test_purge_and_hydrogen_loss(loop):
    result, db, context = loop
    s = loop_summary(result, db, context=context)
    purge = result.streams["purge"]
    assert s.purge_streams == ("purge",)
    assert s.purge_mol_s == pytest.approx(PURGE_FRACTION * result.streams["separator vapour"].total, rel=1e-12)
    assert s.hydrogen_loss == pytest.approx(purge.flows["H2"] / MAKEUP["H2"], rel=1e-12)
    # Hydrogen atoms: H2 fed = H2 leaving + 3/2 NH3 leaving (product, purge).
    h2_out = sum(result.streams[n].flows["H2"] for n in ("purge", "product"))
    nh3_out = sum(result.streams[n].flows["NH3"] for n in ("purge", "product"))
    assert h2_out + 1.5 * nh3_out == pytest.approx(MAKEUP["H2"], rel=1e-9)
    assert s.compressor_power_W is None and s.exchanger_duties_W == {}


def test_named_product_and_a_product_that_does_not_leave(loop):
    result, db, context = loop
    s = loop_summary(result, db, product="Ar", context=context)
    assert s.product == "Ar" and s.production_basis == LIQUID_BASIS
    assert s.production_mol_s == pytest.approx(result.streams["product"].flows["Ar"], rel=1e-12)
    with pytest.raises(InputError, match="leaves by no boundary-out stream"):
        loop_summary(result, db, product="CO", context=context)


def test_no_reactor_no_recycle_gives_none_and_an_exchanger_duty():
    """A cooler and a splitter: no product, conversion, recycle or inerts; the cooler's duty is H_out - H_in."""
    db = default_database()
    context = Context(Case("invented cooler", (), SpeciesSpec(), (), ReportSpec()), db)
    feed = Material(500.0, 30e5, {"H2": 3.0, "N2": 1.0})
    sheet = Flowsheet("cooler", {"gas": feed}, (
        Exchanger("cooler", ("gas",), ("cooled",), T=320.0),
        Splitter("tee", ("cooled",), ("a", "b"), fraction=0.25)))
    result = settle_flowsheet(sheet, context)
    s = loop_summary(result, db, context=context)
    assert s.product is None and s.production_mol_s is None and s.production_basis is None
    assert s.key_reactant is None and s.conversion_per_pass is None and s.reactor_inlets == ()
    assert s.recycle_streams == () and s.recycle_ratio is None
    assert s.inerts == {} and s.inert_fraction is None
    assert s.purge_streams == ("a", "b") and s.purge_mol_s == pytest.approx(4.0, rel=1e-12)
    assert s.hydrogen_loss == pytest.approx(1.0, rel=1e-12)  # every H2 fed leaves by the two splitter outlets
    expected = mixture_enthalpy(feed.flows, 320.0, 30e5, db=db) - mixture_enthalpy(feed.flows, 500.0, 30e5, db=db)
    assert s.exchanger_duties_W["cooler"] == pytest.approx(expected, rel=1e-9)
    assert expected < 0.0


def test_all_outlets_basis_for_a_gas_product():
    """A product that leaves only as gas is counted over every boundary-out stream that carries it."""
    db = default_database()
    context = Context(Case("invented tee", (), SpeciesSpec(), (), ReportSpec()), db)
    sheet = Flowsheet("tee", {"gas": Material(400.0, 20e5, {"H2": 3.0, "N2": 1.0})},
                      (Splitter("tee", ("gas",), ("a", "b"), fraction=0.25),))
    result = settle_flowsheet(sheet, context)
    s = loop_summary(result, db, product="H2", context=context)
    assert s.production_basis == ALL_OUT_BASIS and s.product_streams == ("a", "b")
    assert s.production_mol_s == pytest.approx(3.0, rel=1e-12) and s.product_elsewhere_mol_s == 0.0
