"""Bad input to equilibrate(): each case must raise the right exception with a message that says what is wrong.

Table-driven: (id, call, exception class, words the message must contain).
The words are matched case-insensitively as whole words.  The issue's list of bad inputs is
the checklist; the expectations are the documented behaviour of gibbsmin.errors
(common practice, no source).
"""

from __future__ import annotations

import math
import re

import pytest

import gibbsmin
from gibbsmin import InputError, TemperatureRangeError, UnknownSpeciesError

REFORMER_FEED = {"CH4": 1.0, "H2O": 3.0}


def _call(feed=REFORMER_FEED, T=1000.0, P=1e5, **options):
    return lambda: gibbsmin.equilibrate(feed, T, P, **options)


CASES = [
    # unknown names, with close-match suggestions
    ("unknown-species-CH5", _call({"CH5": 1.0}), UnknownSpeciesError, ["unknown species", "CH5", "CH4"]),
    ("misspelt-alias-metane", _call({"metane": 1.0}), UnknownSpeciesError, ["unknown species", "metane", "methane"]),
    ("unknown-in-explicit-set", _call(species=["CH4", "H2O", "CO", "XYZ"]), UnknownSpeciesError, ["unknown species", "XYZ"]),
    ("unknown-in-exclude", _call(exclude=["graphit"]), UnknownSpeciesError, ["graphit", "graphite"]),
    ("unknown-in-inert", _call({"CH4": 1.0, "H2O": 3.0, "N2": 1.0}, inert=["nitrogn"]), UnknownSpeciesError,
     ["nitrogn", "nitrogen"]),
    # the feed itself
    ("negative-amount", _call({"CH4": -1.0, "H2O": 3.0}), InputError, ["CH4", "negative"]),
    ("nan-amount", _call({"CH4": math.nan, "H2O": 3.0}), InputError, ["CH4", "finite"]),
    ("inf-amount", _call({"CH4": math.inf}), InputError, ["CH4", "finite"]),
    ("string-amount", _call({"CH4": "1"}), InputError, ["CH4", "number"]),
    ("bool-amount", _call({"CH4": True}), InputError, ["CH4", "number"]),
    ("all-zero-feed", _call({"CH4": 0.0, "H2O": 0.0}), InputError, ["zero", "positive"]),
    ("empty-feed", _call({}), InputError, ["feed", "non-empty"]),
    ("feed-not-a-mapping", _call([("CH4", 1.0)]), InputError, ["feed", "mapping"]),
    # temperature
    ("T-zero", _call(T=0.0), InputError, ["T", "positive", "K"]),
    ("T-negative", _call(T=-300.0), InputError, ["T", "positive", "K"]),
    ("T-nan", _call(T=math.nan), InputError, ["T", "finite"]),
    ("T-inf", _call(T=math.inf), InputError, ["T", "finite"]),
    ("T-string", _call(T="1000"), InputError, ["T", "number", "K"]),
    ("T-bool", _call(T=True), InputError, ["T", "number"]),
    # pressure
    ("P-zero", _call(P=0.0), InputError, ["P", "positive", "Pa"]),
    ("P-negative", _call(P=-1e5), InputError, ["P", "positive", "Pa"]),
    ("P-nan", _call(P=math.nan), InputError, ["P", "finite"]),
    ("P-inf", _call(P=math.inf), InputError, ["P", "finite"]),
    ("P-string", _call(P="30 bar"), InputError, ["P", "number", "Pa"]),
    ("P-bool", _call(P=False), InputError, ["P", "number"]),
    # data ranges
    ("T-above-range-explicit-set", _call({"H2O": 1.0}, T=7000.0, species=["H2O", "H2", "O2"]),
     TemperatureRangeError, ["7000", "H2O", "data range", "allow_extrapolation"]),
    ("T-below-range-feed-species", _call({"H2S": 1.0, "H2": 1.0}, T=250.0), TemperatureRangeError,
     ["250", "H2S", "data range"]),
    # species set
    ("feed-element-no-species-carries", _call({"CH4": 1.0, "H2O": 1.0, "N2": 1.0}, species=["CH4", "H2O", "CO", "CO2", "H2"]),
     InputError, ["element", "N", "carried", "add a species"]),
    ("feed-element-no-species-carries-O", _call({"CH4": 1.0, "H2O": 1.0}, species=["CH4", "H2", "C(s)"]),
     InputError, ["element", "O", "carried"]),
    ("excluded-feed-species", _call(exclude=["H2O"]), InputError, ["H2O", "excluded"]),
    ("excluded-feed-species-by-alias", _call(exclude=["steam"]), InputError, ["H2O", "excluded"]),
    ("no-gas-species", _call({"C(s)": 1.0}, species=["C(s)"]), InputError, ["no gas"]),
    ("species-as-one-string", _call(species="CH4"), InputError, ["lists"]),
    ("exclude-as-one-string", _call(exclude="C(s)"), InputError, ["lists"]),
    # options
    ("unknown-method", _call(method="simplex"), InputError, ["simplex", "newton", "convex", "auto"]),
    ("inert-not-in-feed", _call(inert=["N2"]), InputError, ["N2", "not in the feed"]),
    ("inert-condensed", _call({"CH4": 1.0, "H2O": 3.0, "C(s)": 1.0}, inert=["C(s)"]), InputError, ["C(s)", "gas"]),
]


@pytest.mark.parametrize("call, error, words", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_bad_input_is_refused_with_a_clear_message(call, error, words):
    with pytest.raises(error) as caught:
        call()
    assert isinstance(caught.value, gibbsmin.GibbsminError)
    message = str(caught.value)
    for word in words:
        whole_word = rf"(?<![A-Za-z0-9_]){re.escape(word)}(?![A-Za-z0-9_])"
        assert re.search(whole_word, message, re.IGNORECASE), f"{word!r} missing from: {message}"


def test_unknown_species_error_carries_its_suggestions():
    with pytest.raises(UnknownSpeciesError) as caught:
        gibbsmin.equilibrate({"metane": 1.0}, 1000.0, 1e5)
    assert caught.value.name == "metane"
    assert caught.value.suggestions[0] == "methane"
    assert isinstance(caught.value, KeyError)  # callers may catch the built-in family


def test_errors_belong_to_the_builtin_families():
    # Callers may catch ValueError for bad values (pint-style family, DESIGN/STYLE).
    for error in (InputError, TemperatureRangeError):
        assert issubclass(error, ValueError) and issubclass(error, gibbsmin.GibbsminError)


def test_temperature_range_error_carries_the_range():
    with pytest.raises(TemperatureRangeError) as caught:
        gibbsmin.equilibrate({"H2O": 1.0}, 7000.0, 1e5, species=["H2O", "H2", "O2"])
    error = caught.value
    assert (error.species, error.T, error.T_min, error.T_max) == ("H2O", 7000.0, 200.0, 6000.0)


# Regression (fixed in 41d9008, "feed species outside the species set now count
# in the element totals"): a feed species left out of an explicit species set
# used to lose its atoms without a word, and the answer was certified.

def test_feed_species_outside_an_explicit_set_keeps_its_atoms():
    # H2O fed but not in the set; its H and O are carried by H2, CO and CO2.
    feed = {"CH4": 1.0, "H2O": 1.0}
    eq = gibbsmin.equilibrate(feed, 1000.0, 1e5, species=["CH4", "H2", "CO", "CO2", "C(s)"])
    assert eq.certificate.certified
    db = gibbsmin.default_database()
    for element in ("C", "H", "O"):
        fed = sum(db[s].elements.get(element, 0.0) * n for s, n in feed.items())
        out = sum(db[s].elements.get(element, 0.0) * n for s, n in eq.amounts.items())
        assert out == pytest.approx(fed, rel=1e-10), f"{element}: {out} mol of atoms out, {fed} in"
