"""Regenerate gas.toml and condensed.toml from the NASA data that Cantera ships.

Run once by a maintainer when the species list changes (needs the test extras):

    python species/build_species.py

The engine never imports Cantera: it reads the committed TOML files.  This
script only copies coefficients (no refitting), computes the enthalpy of
formation at 298.15 K from each polynomial, and attaches critical constants
from the ``chemicals`` package for gases a cubic equation of state will need.
Every value carries a source key listed in SOURCES.md.
"""

from __future__ import annotations

import datetime
import os
import sys
from pathlib import Path

import cantera as ct
from chemicals import acentric, critical

HERE = Path(__file__).resolve().parent

# our name: (name in the NASA file, aliases, CAS number for critical constants or None)
GASES = {
    "H2": ("H2", ["hydrogen"], "1333-74-0"),
    "O2": ("O2", ["oxygen"], "7782-44-7"),
    "N2": ("N2", ["nitrogen"], "7727-37-9"),
    "Ar": ("Ar", ["argon", "AR"], "7440-37-1"),
    "He": ("He", ["helium", "HE"], "7440-59-7"),
    "H2O": ("H2O", ["water", "steam", "H2O(g)"], "7732-18-5"),
    "CO": ("CO", ["carbon monoxide"], "630-08-0"),
    "CO2": ("CO2", ["carbon dioxide"], "124-38-9"),
    "CH4": ("CH4", ["methane"], "74-82-8"),
    "C2H6": ("C2H6", ["ethane"], "74-84-0"),
    "C2H4": ("C2H4", ["ethylene", "ethene"], "74-85-1"),
    "C2H2": ("C2H2,acetylene", ["acetylene", "ethyne"], "74-86-2"),
    "C3H8": ("C3H8", ["propane"], "74-98-6"),
    "C3H6": ("C3H6,propylene", ["propylene", "propene"], "115-07-1"),
    "nC4H10": ("C4H10,n-butane", ["n-butane", "butane", "n-C4H10", "C4H10"], "106-97-8"),
    "iC4H10": ("C4H10,isobutane", ["isobutane", "i-butane", "i-C4H10"], "75-28-5"),
    "nC5H12": ("C5H12,n-pentane", ["n-pentane", "pentane", "n-C5H12"], "109-66-0"),
    "iC5H12": ("C5H12,i-pentane", ["isopentane", "i-pentane", "i-C5H12"], "78-78-4"),
    "nC7H16": ("C7H16,n-heptane", ["n-heptane", "heptane", "n-C7H16"], "142-82-5"),
    "nC8H18": ("C8H18,n-octane", ["n-octane", "octane", "n-C8H18"], "111-65-9"),
    "C6H6": ("C6H6", ["benzene"], "71-43-2"),
    "C7H8": ("C7H8", ["toluene"], "108-88-3"),
    "C3H4": ("C3H4,propyne", ["propyne", "methylacetylene"], "74-99-7"),
    "C3H4-allene": ("C3H4,allene", ["allene", "propadiene"], "463-49-0"),
    "C4H6": ("C4H6,butadiene", ["butadiene", "1,3-butadiene"], "106-99-0"),
    "C4H8-1": ("C4H8,1-butene", ["1-butene", "butene"], "106-98-9"),
    "iC4H8": ("C4H8,isobutene", ["isobutene", "isobutylene"], "115-11-7"),
    "CH3OH": ("CH3OH", ["methanol", "MeOH"], "67-56-1"),
    "C2H5OH": ("C2H5OH", ["ethanol", "EtOH"], "64-17-5"),
    "CH3OCH3": ("CH3OCH3", ["dimethyl ether", "DME"], "115-10-6"),
    "HCOOH": ("HCOOH", ["formic acid"], "64-18-6"),
    "CH2O": ("HCHO,formaldehy", ["formaldehyde", "HCHO"], "50-00-0"),
    "CH3CHO": ("CH3CHO,ethanal", ["acetaldehyde", "ethanal"], "75-07-0"),
    "C2H4O": ("C2H4O,ethylen", ["ethylene oxide", "oxirane"], "75-21-8"),
    "CH3COOH": ("CH3COOH", ["acetic acid"], "64-19-7"),
    "CH2CO": ("CH2CO,ketene", ["ketene"], "463-51-4"),
    "NH3": ("NH3", ["ammonia"], "7664-41-7"),
    "N2H4": ("N2H4", ["hydrazine"], "302-01-2"),
    "NO": ("NO", ["nitric oxide", "nitrogen monoxide"], "10102-43-9"),
    "NO2": ("NO2", ["nitrogen dioxide"], "10102-44-0"),
    "N2O": ("N2O", ["nitrous oxide"], "10024-97-2"),
    "N2O4": ("N2O4", ["dinitrogen tetroxide"], "10544-72-6"),
    "N2O3": ("N2O3", ["dinitrogen trioxide"], None),
    "N2O5": ("N2O5", ["dinitrogen pentoxide"], None),
    "NO3": ("NO3", [], None),
    "HNO": ("HNO", [], None),
    "HNO2": ("HNO2", ["nitrous acid"], None),
    "HNO3": ("HNO3", ["nitric acid"], "7697-37-2"),
    "HCN": ("HCN", ["hydrogen cyanide"], "74-90-8"),
    "HNCO": ("HNCO", ["isocyanic acid"], None),
    "NCO": ("NCO", [], None),
    "CN": ("CN", [], None),
    "C2N2": ("C2N2", ["cyanogen"], "460-19-5"),
    "H2S": ("H2S", ["hydrogen sulfide", "hydrogen sulphide"], "7783-06-4"),
    "COS": ("COS", ["carbonyl sulfide", "OCS"], "463-58-1"),
    "CS2": ("CS2", ["carbon disulfide"], "75-15-0"),
    "SO2": ("SO2", ["sulfur dioxide", "sulphur dioxide"], "7446-09-5"),
    "SO3": ("SO3", ["sulfur trioxide", "sulphur trioxide"], "7446-11-9"),
    "SO": ("SO", [], None),
    "SH": ("SH", ["HS"], None),
    "S2": ("S2", ["disulfur"], None),
    "S": ("S", ["S(g)"], None),
    "O": ("O", ["O(g)"], None),
    "H": ("H", ["H(g)"], None),
    "N": ("N", ["N(g)"], None),
    "C": ("C", ["C(g)"], None),
    "C2": ("C2", [], None),
    "C3": ("C3", [], None),
    "OH": ("OH", ["hydroxyl"], None),
    "HO2": ("HO2", [], None),
    "H2O2": ("H2O2", ["hydrogen peroxide"], "7722-84-1"),
    "CH": ("CH", [], None),
    "CH2": ("CH2", [], None),
    "CH3": ("CH3", ["methyl"], None),
    "HCO": ("HCO", ["formyl"], None),
    "CH2OH": ("CH2OH", [], None),
    "CH3O": ("CH3O", ["methoxy"], None),
    "C2H": ("C2H", [], None),
    "C2H3": ("C2H3,vinyl", ["vinyl"], None),
    "C2H5": ("C2H5", ["ethyl"], None),
    "NH": ("NH", [], None),
    "NH2": ("NH2", ["amidogen"], None),
}

# our name: (name in the NASA file, formula, state, aliases)
CONDENSED = {
    "C(s)": ("C(gr)", "C", "solid", ["graphite", "carbon", "C(gr)"]),
    "H2O(l)": ("H2O(L)", "H2O", "liquid", ["liquid water", "water(l)"]),
    "H2O(s)": ("H2O(s)", "H2O", "solid", ["ice"]),
    "S(s)": ("S(cr1)", "S", "solid", ["sulfur", "rhombic sulfur", "S(cr)"]),
    "S(s,monoclinic)": ("S(cr2)", "S", "solid", ["monoclinic sulfur"]),
    "S(l)": ("S(L)", "S", "liquid", ["liquid sulfur"]),
    "C6H6(l)": ("C6H6(L)", "C6H6", "liquid", ["liquid benzene"]),
    "C7H8(l)": ("C7H8(L)", "C7H8", "liquid", ["liquid toluene"]),
    "nC8H18(l)": ("C8H18(L),n-octa", "C8H18", "liquid", ["liquid n-octane"]),
}

# The chemicals package offers several compilations; take the first available
# in this order (each is listed under its key in SOURCES.md).
CRITICAL_METHODS = ["IUPAC", "MATTHEWS", "CRC", "PSRK", "YAWS"]
ACENTRIC_METHODS = ["PSRK", "PD", "YAWS"]


def _formula_text(composition: dict[str, float]) -> str:
    # Hill-like order is not needed: the formula is only read back as counts.
    return "".join(f"{el}{'' if n == 1 else int(n)}" for el, n in composition.items())


def _coefficients(species: ct.Species) -> tuple[list[float], list[float], list[float]]:
    thermo = species.thermo
    coeffs = thermo.coeffs
    ranges = list(species.input_data["thermo"]["temperature-ranges"])
    # Cantera reports a one-fit species as [T_min, T_max, T_max]; store it as [T_min, T_max].
    ranges = [t for i, t in enumerate(ranges) if i == 0 or t != ranges[i - 1]]
    high, low = list(coeffs[1:8]), list(coeffs[8:15])
    return ranges, low, high


def _hf298(species: ct.Species) -> float:
    return float(species.thermo.h(298.15)) / 1000.0  # J/kmol -> J/mol


def _critical_constants(cas: str) -> dict[str, object] | None:
    tc_methods = critical.Tc_methods(cas)
    pc_methods = critical.Pc_methods(cas)
    om_methods = acentric.omega_methods(cas)
    tc_m = next((m for m in CRITICAL_METHODS if m in tc_methods), None)
    pc_m = next((m for m in CRITICAL_METHODS if m in pc_methods), None)
    om_m = next((m for m in ACENTRIC_METHODS if m in om_methods), None)
    if tc_m is None or pc_m is None or om_m is None:
        return None
    return {
        "Tc": float(critical.Tc(cas, method=tc_m)),
        "Pc": float(critical.Pc(cas, method=pc_m)),
        "omega": float(acentric.omega(cas, method=om_m)),
        "CAS": cas,
        "source": f"chemicals-{tc_m}/{pc_m}/{om_m}".lower(),
    }


def _toml_list(values: list[float]) -> str:
    return "[" + ", ".join(repr(float(v)) for v in values) + "]"


def _entry(name, formula, state, aliases, species, critical_constants) -> str:
    ranges, low, high = _coefficients(species)
    note = species.input_data["thermo"].get("note", "").strip()
    lines = [
        "[[species]]",
        f'name = "{name}"',
        f'formula = "{formula}"',
        f'state = "{state}"',
        "aliases = [" + ", ".join(f'"{a}"' for a in aliases) + "]",
        f"hf298 = {_hf298(species)!r}  # J/mol, from the polynomial at 298.15 K",
        'source = "nasa-tm4513"',
        f'nasa_name = "{species.name}"',
        f'nasa_note = "{note}"',
        f"T_ranges = {_toml_list(ranges)}  # K",
        f"low = {_toml_list(low)}",
    ]
    if len(ranges) == 3:
        lines.append(f"high = {_toml_list(high)}")
    if critical_constants:
        c = critical_constants
        lines += [
            "[species.critical]",
            f"Tc = {c['Tc']!r}  # K",
            f"Pc = {c['Pc']!r}  # Pa",
            f"omega = {c['omega']!r}",
            f'CAS = "{c["CAS"]}"',
            f'source = "{c["source"]}"',
        ]
    return "\n".join(lines) + "\n"


def _header(description: str, input_file: str) -> str:
    return (
        f"# gibbsmin species data: {description}\n"
        "#\n"
        "# Format: one [[species]] table per species; see DEVELOPERS.md.\n"
        "# Polynomials: NASA 7-coefficient form, copied unchanged from the file\n"
        f"#   {input_file} shipped with Cantera {ct.__version__}, whose original source is\n"
        "#   McBride, Gordon and Reno, NASA TM-4513 (1993) [key nasa-tm4513 in SOURCES.md].\n"
        "#   'low' applies from T_ranges[0] to T_ranges[1], 'high' from T_ranges[1] to T_ranges[2].\n"
        "# Units: temperatures K, hf298 J/mol, Pc Pa.\n"
        f"# Generated by species/build_species.py on {datetime.date.today().isoformat()}; do not edit by hand.\n\n"
    )


def main() -> int:
    data_dir = Path(ct.__file__).parent / "data"
    gas_file = data_dir / "nasa_gas.yaml"
    cond_file = data_dir / "nasa_condensed.yaml"
    gas_species = {s.name: s for s in ct.Species.list_from_file(str(gas_file))}
    cond_species = {s.name: s for s in ct.Species.list_from_file(str(cond_file))}

    gas_text = _header("ideal-gas species", gas_file.name)
    for name, (nasa_name, aliases, cas) in GASES.items():
        species = gas_species[nasa_name]
        crit = _critical_constants(cas) if cas else None
        gas_text += _entry(name, _formula_text(species.composition), "gas", aliases, species, crit) + "\n"

    cond_text = _header("pure condensed species", cond_file.name)
    for name, (nasa_name, formula, state, aliases) in CONDENSED.items():
        cond_text += _entry(name, formula, state, aliases, cond_species[nasa_name], None) + "\n"

    for filename, text in (("gas.toml", gas_text), ("condensed.toml", cond_text)):
        target = HERE / filename
        tmp = target.with_suffix(".toml.tmp")
        tmp.write_text(text)
        os.replace(tmp, target)
        print(f"wrote {target}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
