"""Build the heat-and-mass balance of the invented Birchwood ammonia plant front end, with planted errors.

The plant, its design figures and its errors are our own invention.  The
balance is computed with gibbsmin (restricted equilibrium at stated
approaches, adiabatic energy balances, a saturated knock-out drum) and then
written as a vendor would send it: component flows in kmol/h rounded to
0.0001, temperatures to 0.1 degC, pressures in bar(g).  Four errors are
planted on purpose, as a real balance might carry them:

1. R-103 (HT shift): the outlet is shifted 8 K beyond water-gas shift
   equilibrium (energy balance kept consistent) - thermodynamically impossible.
2. R-101 (primary reformer): the stated duty is 85 % of what the streams need.
3. Stream 17 (methanator outlet): H2 is 35 kmol/h too high (a hydrogen balance
   error; it also moves the mass balance by about 0.1 %).
4. Stream 12 (knock-out gas): the "Total flow" row is 100 kmol/h lower than
   the sum of its components (a typing error in the total).

Run from the repository root to regenerate ``streams.csv`` and ``streams.xlsx``:

    python examples/plant/make_balance.py
"""

from __future__ import annotations

import csv
import io
import math
from pathlib import Path

import scipy.optimize

from gibbsmin.energy import mixture_enthalpy
from gibbsmin import equilibrate_with_approach

HERE = Path(__file__).resolve().parent
ATM = 101325.0
KMOL_H = 1000.0 / 3600.0  # mol/s in one kmol/h
ROWS = ["CH4", "C2H6", "C3H8", "CO", "CO2", "H2", "N2", "O2", "Ar", "H2O"]
REFORMING = ["CH4", "C2H6", "C3H8", "H2O", "CO", "CO2", "H2", "N2", "O2", "Ar"]


def bar_g(value: float) -> float:
    return value * 1e5 + ATM


def kelvin(degC: float) -> float:
    return degC + 273.15


def enthalpy(flows: dict[str, float], T: float, P: float) -> float:
    kept = {s: n for s, n in flows.items() if n > 1e-12}
    return mixture_enthalpy(kept, T, P)


def temperature_for(flows: dict[str, float], H: float, P: float, low: float = 280.0, high: float = 1600.0) -> float:
    return scipy.optimize.brentq(lambda T: enthalpy(flows, T, P) - H, low, high, xtol=1e-7)


def gas_only(eq) -> dict[str, float]:
    return {s: n for s, n in eq.amounts.items() if n > 0.0}


def adiabatic_with_approach(feed, H_in, P, approach, frozen, species, bracket):
    """The outlet whose enthalpy equals the inlet's, with reactions held at their approaches."""
    def outlet(T):
        return equilibrate_with_approach(feed, T, P, approach, frozen=frozen or None, species=species)

    T = scipy.optimize.brentq(lambda T: enthalpy(gas_only(outlet(T)), T, P) - H_in, *bracket, xtol=1e-6)
    return gas_only(outlet(T)), T


def build() -> tuple[dict[str, dict], dict[str, float]]:
    """Streams by id: description, T [K], P [Pa], phase, flows [mol/s]; and the unit duties [W]."""
    streams: dict[str, dict] = {}
    duty: dict[str, float] = {}

    def add(sid, description, flows, T, P, phase="gas"):
        streams[sid] = {"description": description, "flows": flows, "T": T, "P": P, "phase": phase}

    gas = {"CH4": 93.6, "C2H6": 3.4, "C3H8": 0.6, "CO2": 1.0, "N2": 1.4}
    add("1", "Natural gas (desulfurised)", {s: x / 100 * 1500.0 * KMOL_H for s, x in gas.items()},
        kelvin(380.0), bar_g(40.0))
    add("2", "Process steam", {"H2O": 4950.0 * KMOL_H}, kelvin(390.0), bar_g(40.0))
    mixed = {**streams["1"]["flows"], **streams["2"]["flows"]}
    H_mix = sum(enthalpy(streams[s]["flows"], streams[s]["T"], streams[s]["P"]) for s in ("1", "2"))
    add("3", "Mixed feed", mixed, temperature_for(mixed, H_mix, bar_g(39.6)), bar_g(39.6))
    add("4", "Reformer feed", mixed, kelvin(520.0), bar_g(39.0))
    duty["E-101"] = enthalpy(mixed, kelvin(520.0), bar_g(39.0)) - enthalpy(mixed, streams["3"]["T"], bar_g(39.6))

    P5 = bar_g(35.0)
    eq = equilibrate_with_approach(mixed, kelvin(790.0), P5, {"steam methane reforming": 10.0},
                                   frozen=["N2"], species=REFORMING[:8])
    add("5", "Primary reformer outlet", gas_only(eq), kelvin(790.0), P5)
    duty["R-101"] = enthalpy(streams["5"]["flows"], kelvin(790.0), P5) - enthalpy(mixed, kelvin(520.0), bar_g(39.0))

    air = {"N2": 78.08, "O2": 20.95, "Ar": 0.97}
    add("6", "Process air", {s: x / 100 * 1850.0 * KMOL_H for s, x in air.items()}, kelvin(550.0), bar_g(35.0))
    feed7 = dict(streams["5"]["flows"])
    for s, n in streams["6"]["flows"].items():
        feed7[s] = feed7.get(s, 0.0) + n
    H7 = sum(enthalpy(streams[s]["flows"], streams[s]["T"], streams[s]["P"]) for s in ("5", "6"))
    P7 = bar_g(34.2)
    flows7, T7 = adiabatic_with_approach(feed7, H7, P7, {"steam methane reforming": 3.0}, ["N2", "Ar"],
                                         REFORMING, (1100.0, 1500.0))
    add("7", "Secondary reformer outlet", flows7, T7, P7)

    add("8", "HT shift inlet", flows7, kelvin(370.0), bar_g(33.6))
    duty["E-102"] = enthalpy(flows7, kelvin(370.0), bar_g(33.6)) - enthalpy(flows7, T7, P7)

    # Planted error 1: the vendor's HT shift outlet is 8 K beyond shift equilibrium.
    shift_species = ["CH4", "C2H6", "C3H8", "H2O", "CO", "CO2", "H2", "N2", "Ar"]
    shift_frozen = [s for s in ("CH4", "C2H6", "C3H8", "N2", "Ar") if flows7.get(s, 0.0) > 0]
    shift_species = [s for s in shift_species if s in flows7]
    H9 = enthalpy(flows7, kelvin(370.0), bar_g(33.6))
    P9 = bar_g(33.2)
    flows9, T9 = adiabatic_with_approach(flows7, H9, P9, {"water-gas shift": -8.0}, shift_frozen,
                                         shift_species, (600.0, 800.0))
    add("9", "HT shift outlet", flows9, T9, P9)
    add("10", "LT shift inlet", flows9, kelvin(205.0), bar_g(32.7))
    duty["E-103"] = enthalpy(flows9, kelvin(205.0), bar_g(32.7)) - enthalpy(flows9, T9, P9)
    H11 = enthalpy(flows9, kelvin(205.0), bar_g(32.7))
    P11 = bar_g(32.3)
    flows11, T11 = adiabatic_with_approach(flows9, H11, P11, {"water-gas shift": 10.0}, shift_frozen,
                                           shift_species, (470.0, 560.0))
    add("11", "LT shift outlet", flows11, T11, P11)

    # Knock-out drum at 40 degC: the gas leaves saturated with water (vapour pressure 7.385 kPa at 40 degC,
    # steam tables, from memory), the rest condenses.
    P12 = bar_g(31.5)
    y_water = 7385.0 / P12
    dry = {s: n for s, n in flows11.items() if s != "H2O"}
    water_gas = y_water / (1 - y_water) * sum(dry.values())
    add("12", "Knock-out drum gas", {**dry, "H2O": water_gas}, kelvin(40.0), P12)
    add("13", "Process condensate", {"H2O": flows11["H2O"] - water_gas}, kelvin(40.0), P12, phase="liquid")
    duty["V-101"] = (enthalpy(streams["12"]["flows"], kelvin(40.0), P12)
                     + mixture_enthalpy({"H2O(l)": streams["13"]["flows"]["H2O"]}, kelvin(40.0), P12)
                     - enthalpy(flows11, T11, P11))

    # CO2 removal: 500 ppmv CO2 slip; the CO2 product takes the water and a little H2 and N2.
    gas12 = streams["12"]["flows"]
    slip = 500e-6 * (sum(dry.values()) - dry["CO2"])
    clean = {s: n for s, n in dry.items() if s != "CO2"}
    lost = {"H2": 0.004 * clean["H2"], "N2": 0.002 * clean["N2"]}
    clean = {s: n - lost.get(s, 0.0) for s, n in clean.items()}
    clean["CO2"] = slip
    add("14", "Purified gas", clean, kelvin(45.0), bar_g(30.8))
    add("15", "CO2 product", {"CO2": gas12["CO2"] - slip, "H2O": gas12["H2O"], **lost}, kelvin(45.0), bar_g(0.5))

    add("16", "Methanator inlet", clean, kelvin(300.0), bar_g(30.4))
    duty["E-105"] = enthalpy(clean, kelvin(300.0), bar_g(30.4)) - enthalpy(clean, kelvin(45.0), bar_g(30.8))
    P17 = bar_g(30.0)
    flows17, T17 = adiabatic_with_approach(clean, enthalpy(clean, kelvin(300.0), bar_g(30.4)), P17,
                                           {"methanation": 120.0, "CO2 methanation": 120.0}, ["N2", "Ar"],
                                           ["CH4", "H2O", "CO", "CO2", "H2", "N2", "Ar"], (560.0, 700.0))
    add("17", "Methanator outlet (synthesis gas)", flows17, T17, P17)

    # Planted errors 2 and 3.
    duty["R-101"] *= 0.85
    streams["17"]["flows"] = {**flows17, "H2": flows17["H2"] + 35.0 * KMOL_H}
    return streams, duty


def rounded(kmol_h: float) -> float:
    """A flow as a vendor sheet writes it: 0.0001 kmol/h, and three significant digits for traces."""
    if kmol_h >= 0.1:
        return round(kmol_h, 4)
    if kmol_h < 1e-9:
        return 0.0
    return float(f"{kmol_h:.3g}")


def table_rows(streams: dict[str, dict]) -> list[list[object]]:
    ids = list(streams)
    rows: list[list[object]] = [["Stream", "unit", *ids],
                                ["Description", "", *(streams[s]["description"] for s in ids)],
                                ["Phase", "", *(streams[s]["phase"] for s in ids)],
                                ["Temperature", "degC", *(round(streams[s]["T"] - 273.15, 1) for s in ids)],
                                ["Pressure", "bar(g)", *(round((streams[s]["P"] - ATM) / 1e5, 2) for s in ids)]]
    totals = []
    for s in ids:
        total = sum(rounded(n / KMOL_H) for n in streams[s]["flows"].values())
        if s == "12":
            total -= 100.0  # planted error 4
        totals.append(round(total, 4))
    rows.append(["Total flow", "kmol/h", *totals])
    for species in ROWS:
        cells = []
        for s in ids:
            n = rounded(streams[s]["flows"].get(species, 0.0) / KMOL_H)
            cells.append(n if n > 0 else None)
        rows.append([species, "kmol/h", *cells])
    return rows


def write(rows: list[list[object]]) -> None:
    text = io.StringIO()
    csv.writer(text, lineterminator="\n").writerows(["" if c is None else c for c in row] for row in rows)
    (HERE / "streams.csv").write_text(text.getvalue(), encoding="utf-8")
    from openpyxl import Workbook

    book = Workbook()
    sheet = book.active
    sheet.title = "Stream table"
    for row in rows:
        sheet.append(row)
    book.save(HERE / "streams.xlsx")


def main() -> None:
    streams, duty = build()
    write(table_rows(streams))
    for unit, value in duty.items():
        print(f"{unit}: duty {value / 1e6:.2f} MW")
    for sid, s in streams.items():
        print(f"{sid:>3} {s['T'] - 273.15:7.1f} degC  {sum(s['flows'].values()) / KMOL_H:9.1f} kmol/h  {s['description']}")
    print("check:", math.isfinite(sum(duty.values())))


if __name__ == "__main__":
    main()
