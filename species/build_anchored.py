"""Write the data set "atct-anchored": the shipped NASA polynomials re-anchored to ATcT 1.112.

Run once by a maintainer when gas.toml, condensed.toml or the ATcT version changes
(needs the test extras, for the ``chemicals`` package that ships the ATcT tables):

    python species/build_anchored.py

For every shipped species that the Active Thermochemical Tables (version 1.112)
cover, a6 of both polynomial ranges is shifted by (ATcT delta-f H(298.15 K) -
NASA h(298.15 K)) / R, so that the enthalpy of formation at 298.15 K becomes
ATcT's while heat capacity and entropy stay NASA's (a6 enters neither).  Each
such species carries ATcT's uncertainty, which ATcT states as a 95 % interval;
half of it is stored as the standard uncertainty.  Species ATcT lacks keep
NASA's polynomial unchanged, with the conservative default standard uncertainty
below.  Both sources use the same reference states at 298.15 K and 1 bar
(H2, O2, N2 gas, graphite, rhombic sulfur): the script checks that ATcT gives
zero for the gaseous reference elements.  The output goes to species/atct-anchored/.

Liquids the NASA file lacks are built here where ATcT's liquid file and a named
heat-capacity source allow (``NEW_LIQUIDS``): one NASA-7 range fitted to the
liquid's heat capacity, a6 set by ATcT's delta-f H(298.15 K) and a7 by a named
standard entropy.  Liquid methanol is the one so far (needs the ``chemicals``
package's Zabransky et al. heat capacities too).
"""

from __future__ import annotations

import datetime
import math
import os
import sys
import tomllib
from pathlib import Path

import numpy as np
from chemicals import heat_capacity, reaction

HERE = Path(__file__).resolve().parent
OUT = HERE / "atct-anchored"
R = 8.314462618  # J/(mol K), as gibbsmin.thermo.nasa7.R
T_REF = 298.15  # K

#: Standard uncertainty of delta-f H(298.15 K) given to species ATcT lacks, [J/mol]
#: (common practice, no source: chosen conservative, ten times the NASA/JANAF
#: spread of the shipped sulfur species (at most 0.2 kJ/mol, measured) and above
#: every ATcT standard uncertainty of a shipped closed-shell species).
DEFAULT_UNCERTAINTY = 2000.0

#: ATcT's uncertainties are 95 % intervals (about two standard uncertainties; from memory,
#: as stated on the ATcT pages); the stored value is the standard uncertainty.
COVERAGE = 2.0

# our name -> CAS number of the ATcT 1.112 entry (gas file), chosen by the
# molecule, not only the formula (isomers: propyne/allene, ethanol/DME, ...).
ATCT_GAS = {
    "H2": "1333-74-0", "O2": "7782-44-7", "N2": "7727-37-9", "Ar": "7440-37-1", "He": "7440-59-7",
    "H2O": "7732-18-5", "CO": "630-08-0", "CO2": "124-38-9", "CH4": "74-82-8", "C2H6": "74-84-0",
    "C2H4": "74-85-1", "C2H2": "74-86-2", "C3H8": "74-98-6", "C3H6": "115-07-1", "nC4H10": "106-97-8",
    "iC4H10": "75-28-5", "nC7H16": "142-82-5", "nC8H18": "111-65-9", "C6H6": "71-43-2",
    "C7H8": "108-88-3", "C3H4": "74-99-7", "C3H4-allene": "463-49-0", "C4H8-1": "106-98-9",
    "iC4H8": "115-11-7", "CH3OH": "67-56-1", "C2H5OH": "64-17-5", "CH3OCH3": "115-10-6",
    "CH2O": "50-00-0", "CH3CHO": "75-07-0", "C2H4O": "75-21-8", "CH2CO": "463-51-4",
    "NH3": "7664-41-7", "N2H4": "302-01-2", "NO": "10102-43-9", "NO2": "10102-44-0",
    "N2O": "10024-97-2", "N2O4": "10544-72-6", "N2O3": "10544-73-7", "N2O5": "10102-03-1",
    "NO3": "12033-49-7", "HNO": "14332-28-6", "HNO2": "7782-77-6", "HNO3": "7697-37-2",
    "HCN": "74-90-8", "HNCO": "75-13-8", "NCO": "22400-26-6", "CN": "2074-87-5", "C2N2": "460-19-5",
    "O": "17778-80-2", "H": "12385-13-6", "N": "17778-88-0", "C": "7440-44-0", "C2": "12070-15-4",
    "C3": "12075-35-3", "OH": "3352-57-6", "HO2": "3170-83-0", "H2O2": "7722-84-1",
    "CH": "3315-37-5", "CH2": "2465-56-7", "CH3": "2229-07-4", "HCO": "2597-44-6",
    "CH2OH": "2597-43-5", "CH3O": "2143-68-2", "C2H": "2122-48-7", "C2H3": "2669-89-8",
    "C2H5": "2025-56-1", "NH": "13774-92-0", "NH2": "13770-40-6",
}
# our name -> CAS number of the ATcT 1.112 entry (liquid file)
ATCT_LIQUID = {"H2O(l)": "7732-18-5", "C7H8(l)": "108-88-3", "nC8H18(l)": "111-65-9"}
# Condensed species ATcT lacks whose other phase it has: they move with that phase (same shift), so
# NASA's enthalpy of the phase change, and the melting or boiling point, stay as they were (anchoring
# the liquid alone would move ice's melting point by 0.15 K and benzene's boiling point by 3.5 K).
# Their uncertainty is that phase's (fully correlated, hf298_tied_to) and the default, in quadrature.
TIED = {"H2O(s)": "H2O(l)", "C6H6(l)": "C6H6"}
# Liquids built here (none in the NASA file): our name -> how.  Heat capacity: the saturated
# liquid's of Zabransky, Ruzicka, Majer and Domalski (1996), J. Phys. Chem. Ref. Data Monograph 6
# (their recommended spline, 180 to 503 K, as `chemicals` serves it), fitted with one NASA-7
# range on T_ranges; the range stops at 480 K (0.94 Tc), past which the saturated liquid's heat
# capacity climbs towards the critical point faster than a quartic follows.  S(298.15 K): the NIST
# Chemistry WebBook's (via `chemicals`, method WEBBOOK).  delta-f H(298.15 K): ATcT's liquid file.
NEW_LIQUIDS = {
    "CH3OH(l)": {"formula": "CH4O", "aliases": ["liquid methanol", "methanol(l)"], "CAS": "67-56-1",
                 "T_ranges": [180.0, 480.0]},
}
NEW_LIQUID_SOURCE = "zabransky-1996/nist-webbook"
#: Largest relative miss of the fitted heat capacity the build accepts (measured 0.49 % for CH3OH(l)).
FIT_TOLERANCE = 0.006
# The elements' reference forms: zero by definition in both sources.
REFERENCE_FORMS = {"C(s)", "S(s)"}
GAS_REFERENCES = ("H2", "O2", "N2", "Ar", "He")


def _atct_row(table, cas: str, what: str) -> tuple[float, float, str]:
    row = table.loc[cas]
    return float(row[what]), float(row["uncertainty"]), f"{row['Chemical']} ({row['Formula']})"


def _anchor(entry: dict, gas_table, liquid_table, anchors: dict) -> dict:
    """The anchor of one species: target hf298, its standard uncertainty, source and ATcT entry."""
    name = entry["name"]
    if name in TIED:
        parent = anchors[TIED[name]]
        return {"hf298": entry["hf298"] + parent["shift"], "u": math.hypot(parent["u"], DEFAULT_UNCERTAINTY),
                "source": "nasa-tm4513", "atct": "", "tied_to": TIED[name]}
    if name in ATCT_GAS:
        value, u95, label = _atct_row(gas_table, ATCT_GAS[name], "Hfg")
    elif name in ATCT_LIQUID:
        value, u95, label = _atct_row(liquid_table, ATCT_LIQUID[name], "Hfl")
    elif name in REFERENCE_FORMS:
        return {"hf298": 0.0, "u": 0.0, "source": "reference-state", "atct": ""}
    else:
        return {"hf298": entry["hf298"], "u": DEFAULT_UNCERTAINTY, "source": "nasa-tm4513", "atct": ""}
    return {"hf298": value, "u": u95 / COVERAGE, "source": "atct-1.112", "atct": label}


def _toml_value(value) -> str:
    if isinstance(value, str):
        return '"' + value.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if isinstance(value, list):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    return repr(float(value)) if isinstance(value, float) else repr(value)


def _entry_text(entry: dict, anchor: dict) -> str:
    shift = anchor["hf298"] - entry["hf298"]
    low = list(entry["low"])
    low[5] += shift / R
    lines = ["[[species]]"]
    for key in ("name", "formula", "state", "aliases"):
        lines.append(f"{key} = {_toml_value(entry[key])}")
    lines += [
        f"hf298 = {anchor['hf298']!r}  # J/mol",
        f"hf298_uncertainty = {anchor['u']!r}  # J/mol, standard uncertainty",
        f"hf298_source = {_toml_value(anchor['source'])}",
        f"hf298_shift = {shift!r}  # J/mol, added to NASA's enthalpy at every T",
    ]
    if anchor["atct"]:
        lines.append(f"atct_entry = {_toml_value(anchor['atct'])}")
    if anchor.get("tied_to"):
        lines.append(f"hf298_tied_to = {_toml_value(anchor['tied_to'])}  # moves with it; correlated uncertainty")
    for key in ("source", "nasa_name", "nasa_note"):
        if key in entry:
            lines.append(f"{key} = {_toml_value(entry[key])}")
    lines.append(f"T_ranges = {_toml_value([float(t) for t in entry['T_ranges']])}  # K")
    lines.append(f"low = {_toml_value([float(a) for a in low])}")
    if "high" in entry:
        high = list(entry["high"])
        high[5] += shift / R
        lines.append(f"high = {_toml_value([float(a) for a in high])}")
    if "critical" in entry:
        lines.append("[species.critical]")
        lines += [f"{k} = {_toml_value(v)}" for k, v in entry["critical"].items()]
    return "\n".join(lines) + "\n"


def _fitted_liquid(name: str, how: dict, liquid_table) -> tuple[dict, dict]:
    """A liquid the NASA file lacks: its entry (one NASA-7 range) and its anchor."""
    cas = how["CAS"]
    value, u95, label = _atct_row(liquid_table, cas, "Hfl")
    S298 = float(reaction.S0l(cas, method="WEBBOOK"))
    cp = heat_capacity.zabransky_dict_sat_s[cas]
    T_lo, T_hi = how["T_ranges"]
    T = np.linspace(T_lo, T_hi, 301)
    cp_R = np.array([cp.calculate(t) for t in T]) / R
    a = list(np.polyfit(T, cp_R, 4)[::-1])  # a1 .. a5 of cp/R = a1 + a2 T + ... + a5 T^4
    miss = float(np.max(np.abs(np.polyval(a[::-1], T) / cp_R - 1.0)))
    if miss > FIT_TOLERANCE:
        raise SystemExit(f"{name}: the NASA-7 fit misses the heat capacity by {miss:.2%}")
    t = T_REF
    h_RT = a[0] + a[1] * t / 2 + a[2] * t**2 / 3 + a[3] * t**3 / 4 + a[4] * t**4 / 5
    s_R = a[0] * math.log(t) + a[1] * t + a[2] * t**2 / 2 + a[3] * t**3 / 3 + a[4] * t**4 / 4
    a6 = value / R - h_RT * t
    a7 = S298 / R - s_R
    entry = {"name": name, "formula": how["formula"], "state": "liquid", "aliases": how["aliases"],
             "hf298": value, "source": NEW_LIQUID_SOURCE, "T_ranges": how["T_ranges"],
             "low": [float(x) for x in a] + [a6, a7]}
    return entry, {"hf298": value, "u": u95 / COVERAGE, "source": "atct-1.112", "atct": label}


def _header(description: str, input_file: str) -> str:
    return (
        f"# gibbsmin species data, data set \"atct-anchored\": {description}\n"
        "#\n"
        "# Format: one [[species]] table per species, as species/" + input_file + "; see DEVELOPERS.md.\n"
        f"# Polynomials: those of species/{input_file} (NASA TM-4513, McBride, Gordon and Reno 1993,\n"
        "#   key nasa-tm4513 in SOURCES.md) with a6 of both ranges shifted by hf298_shift / R, so that\n"
        "#   delta-f H(298.15 K) is that of the Active Thermochemical Tables 1.112 (key atct-1.112) for\n"
        "#   every species ATcT covers (hf298_source = \"atct-1.112\"; atct_entry names the ATcT entry).\n"
        "#   Heat capacity and entropy are NASA's, unchanged. Species ATcT lacks keep NASA's values\n"
        "#   (hf298_source = \"nasa-tm4513\", hf298_shift = 0) unless ATcT has their other phase\n"
        "#   (hf298_tied_to): then they move with it, keeping NASA's phase-change enthalpy. The\n"
        "#   reference forms of the elements are zero.\n"
        "# hf298_uncertainty: standard uncertainty of delta-f H(298.15 K), J/mol: ATcT's stated 95 %\n"
        f"#   uncertainty / {COVERAGE:g}; {DEFAULT_UNCERTAINTY:g} J/mol (a stated conservative default) where ATcT\n"
        "#   lacks the species (in quadrature with the other phase's where tied); zero for the elements'\n"
        "#   reference forms.\n"
        + ("# Liquids the NASA file lacks (source = \"" + NEW_LIQUID_SOURCE + "\", hf298_shift = 0): one range\n"
           "#   fitted by build_anchored.py to Zabransky et al.'s (1996) heat capacity, with ATcT's delta-f H\n"
           "#   and the NIST WebBook's S at 298.15 K.\n" if input_file == "condensed.toml" else "")
        +
        "# Units: temperatures K, hf298 J/mol, Pc Pa.\n"
        f"# Generated by species/build_anchored.py on {datetime.date.today().isoformat()}; do not edit by hand.\n\n"
    )


def build() -> dict[str, str]:
    """The text of each output file, by file name."""
    gas_table, liquid_table = reaction.Hfg_ATcT_data, reaction.Hfl_ATcT_data
    for name in GAS_REFERENCES:
        value, u95, _ = _atct_row(gas_table, ATCT_GAS[name], "Hfg")
        if value != 0.0 or u95 != 0.0:
            raise SystemExit(f"ATcT gives {name} {value} J/mol: not the reference state this script assumes")
    texts = {}
    anchors: dict[str, dict] = {}  # by name, with the shift: gas.toml first, so a tied liquid finds its gas
    for filename, description in (("gas.toml", "ideal-gas species"), ("condensed.toml", "pure condensed species")):
        document = tomllib.loads((HERE / filename).read_text(encoding="utf-8"))
        text = _header(description, filename)
        for entry in document["species"]:
            anchor = _anchor(entry, gas_table, liquid_table, anchors)
            anchors[entry["name"]] = {**anchor, "shift": anchor["hf298"] - entry["hf298"]}
            if not math.isfinite(anchor["hf298"]):
                raise SystemExit(f"{entry['name']}: no ATcT value")
            text += _entry_text(entry, anchor) + "\n"
        if filename == "condensed.toml":
            for name, how in NEW_LIQUIDS.items():
                text += _entry_text(*_fitted_liquid(name, how, liquid_table)) + "\n"
        texts[filename] = text
    return texts


def main() -> int:
    OUT.mkdir(exist_ok=True)
    for filename, text in build().items():
        target = OUT / filename
        tmp = target.with_suffix(".toml.tmp")
        tmp.write_text(text, encoding="utf-8")
        os.replace(tmp, target)
        print(f"wrote {target}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
