"""The outside reference for gibbsmin's liquid-solution phases: the `thermo` package's cubic flash.

Reference: thermo 0.6 (Caleb Bell and contributors, Python package), FlashVL
with CEOSGas and CEOSLiquid of class PR78MIX (Peng and Robinson 1976 with the
Robinson and Peng 1978 kappa above omega = 0.491, which is gibbsmin's
Peng-Robinson; plain PRMIX would differ for methanol, omega = 0.559) or SRKMIX
(Soave 1972).  Both sides get the same numbers: Tc, Pc and omega read from
gibbsmin's species database and the kij of gibbsmin's shipped table
(species/interactions.toml, read with gibbsmin.eos.interactions; none for SRK).

The quantum correction.  gibbsmin gives H2 and He the Gunn-Chueh-Prausnitz
effective constants Tc(T), Pc(T), omega = 0 (gibbsmin.eos.quantum).  At a fixed
T these are plain numbers, so a T, P flash hands thermo the same effective
constants (``quantum_correction=True``, the default, as in gibbsmin) and the two
models are then the same function of composition (checked to 1e-10 in ln phi by
tests/test_eos_thermo_reference.py).  A dew or bubble point moves T, so there
the constants are updated at the found T and the point solved again until T
stops moving (a fixed point; H2's constants change slowly with T).

Phases.  thermo names a phase gas or liquid by its own rule, and at loop
pressures it can call a dense vapour a liquid, so phases are identified here by
molar density: of two, the less dense is the vapour; a single phase is vapour
when its molar volume exceeds the mixture's pseudo-critical volume sum z_i
vc_i, with vc_i = Zc R Tc_i / Pc_i of the cubic (Kay's rule; common practice,
no source).

FLASH_CASES holds at least 50 flash conditions of invented mixtures (our own
round plant numbers, no plant's data) at and around the separators of a
methanol loop (40 degC, 80 bar), an ammonia loop (-25 to -10 degC, 150 to 200
bar, and its letdown vessel at about 20 bar) and a shift train's final cooler
(40 degC, 30 bar), for the engine's tests.
"""

from __future__ import annotations

import functools
import itertools
import math
from collections.abc import Mapping
from typing import NamedTuple

from thermo import PR78MIX, SRKMIX, CEOSGas, CEOSLiquid, ChemicalConstantsPackage, FlashVL

import gibbsmin
from gibbsmin.eos import QUANTUM_GASES
from gibbsmin.eos.families import PENG_ROBINSON, SOAVE_REDLICH_KWONG
from gibbsmin.eos.interactions import shipped_kij_matrix
from gibbsmin.thermo import R

THERMO_CLASSES = {"peng-robinson": PR78MIX, "srk": SRKMIX}
FAMILIES = {"peng-robinson": PENG_ROBINSON, "srk": SOAVE_REDLICH_KWONG}

#: Largest |T change| [K] between fixed-point passes of a dew or bubble point with the quantum correction.
QUANTUM_FIXED_POINT_TOLERANCE = 1e-6


class FlashResult(NamedTuple):
    """thermo's flash with phases named by density.

    vapour_fraction is the mole fraction of the feed in the vapour [-] (0 or 1
    for one phase); y and x are the vapour's and liquid's mole fractions (the
    feed's for the phase present, None for the one absent); phases lists
    (name, molar density [mol/m^3]) of each phase present, vapour first.
    """

    vapour_fraction: float
    y: dict[str, float] | None
    x: dict[str, float] | None
    phases: tuple[tuple[str, float], ...]


class SaturationPoints(NamedTuple):
    """Dew and bubble temperatures [K] at a pressure, with the incipient phase's composition; None where absent."""

    dew_T: float | None
    incipient_liquid: dict[str, float] | None
    bubble_T: float | None
    incipient_vapour: dict[str, float] | None


def _critical(names: tuple[str, ...]):
    database = gibbsmin.default_database()
    records = [database[n] for n in names]
    return ([r.critical.Tc for r in records], [r.critical.Pc for r in records],
            [r.critical.omega for r in records], [r.molar_mass for r in records])


def _constants_at(names: tuple[str, ...], T: float, quantum_correction: bool):
    """Tc, Pc, omega handed to thermo: the database's, with the quantum gases' effective values at T."""
    Tc, Pc, omega, _ = _critical(names)
    if quantum_correction:
        for i, name in enumerate(names):
            gas = QUANTUM_GASES.get(name)
            if gas is not None:
                Tc_T, Pc_T = gas.critical(T)
                Tc[i], Pc[i], omega[i] = float(Tc_T), float(Pc_T), 0.0
    return Tc, Pc, omega


@functools.lru_cache(maxsize=256)
def _flasher(names: tuple[str, ...], gas: str, constants: tuple[tuple[float, ...], ...],
             ss_tolerance: float | None = None) -> FlashVL:
    Tc, Pc, omega = (list(c) for c in constants)
    kij = shipped_kij_matrix(gas, list(names))
    n = len(names)
    given = {"Tcs": Tc, "Pcs": Pc, "omegas": omega,
             "kijs": kij.tolist() if kij is not None else [[0.0] * n for _ in range(n)]}
    molar_masses = _critical(names)[3]
    package = ChemicalConstantsPackage(Tcs=Tc, Pcs=Pc, omegas=omega, MWs=molar_masses, names=list(names))
    eos = THERMO_CLASSES[gas]
    flasher = FlashVL(package, None, liquid=CEOSLiquid(eos, given), gas=CEOSGas(eos, given))
    if ss_tolerance is not None:
        flasher.PT_SS_TOL = ss_tolerance
    return flasher


def _split(z: Mapping[str, float]) -> tuple[tuple[str, ...], list[float]]:
    names = tuple(z)
    total = sum(z.values())
    return names, [z[n] / total for n in names]


def _pseudo_critical_volume(names, zs, Tc, Pc, gas: str) -> float:
    family = FAMILIES[gas]
    Zc = (1.0 + family.omega_b * (1.0 - family.delta1 - family.delta2)) / 3.0
    return sum(zi * Zc * R * t / p for zi, t, p in zip(zs, Tc, Pc))


def thermo_flash(z: Mapping[str, float], T: float, P: float, *, gas: str = "peng-robinson",
                 quantum_correction: bool = True, ss_tolerance: float | None = None) -> FlashResult:
    """thermo's vapour-liquid flash of feed ``z`` (amounts by species name) at T [K], P [Pa].

    ``ss_tolerance`` replaces thermo's tolerance of its successive substitution (FlashVL.PT_SS_TOL, 1e-13,
    which leaves about 4e-8 between the phases' ln f at an ammonia separator; 1e-26 leaves 3e-14).
    """
    names, zs = _split(z)
    Tc, Pc, omega = _constants_at(names, T, quantum_correction)
    flasher = _flasher(names, gas, (tuple(Tc), tuple(Pc), tuple(omega)), ss_tolerance)
    state = flasher.flash(T=T, P=P, zs=zs)
    phases = sorted(zip(state.phases, state.betas), key=lambda pair: pair[0].rho())
    if len(phases) == 1:
        phase = phases[0][0]
        vapour = 1.0 / phase.rho() > _pseudo_critical_volume(names, zs, Tc, Pc, gas)
        composition = dict(zip(names, phase.zs))
        label = "vapour" if vapour else "liquid"
        return FlashResult(1.0 if vapour else 0.0, composition if vapour else None,
                           None if vapour else composition, ((label, phase.rho()),))
    if len(phases) > 2:
        raise RuntimeError(f"thermo's FlashVL returned {len(phases)} phases; this reference serves two")
    (light, beta_v), (dense, _) = phases
    return FlashResult(beta_v, dict(zip(names, light.zs)), dict(zip(names, dense.zs)),
                       (("vapour", light.rho()), ("liquid", dense.rho())))


def _saturation(names, zs, P, VF, gas, quantum_correction, T_guess=298.15):
    """(T, incipient composition) of thermo's flash at P and VF, or None where it finds none (or a false one)."""
    T = T_guess
    for _ in range(30 if quantum_correction else 1):
        Tc, Pc, omega = _constants_at(names, T, quantum_correction)
        flasher = _flasher(names, gas, (tuple(Tc), tuple(Pc), tuple(omega)))
        try:
            state = flasher.flash(P=P, VF=VF, zs=zs)
        except Exception:  # thermo raises its own classes (or plain ones) where no point exists
            return None
        incipient = _incipient_phase(state.phases, zs, dew=VF == 1.0)
        if incipient is None:
            return None
        moved, T = abs(state.T - T), state.T
        if not quantum_correction or moved < QUANTUM_FIXED_POINT_TOLERANCE:
            return T, dict(zip(names, incipient.zs))
    return None  # no settled point: thermo's answers moved from pass to pass (none near this pressure)


def _incipient_phase(phases, zs, *, dew: bool):
    """The incipient phase of a dew (denser) or bubble (lighter) point, checked; None for a false answer.

    True when the other phase is the feed and the incipient one differs from it in
    composition (a mixture) or in density by more than 1 % (a pure fluid): thermo
    can return the trivial solution, or at VF = 0 the dew point's state.
    """
    if len(phases) != 2:
        return None
    light, dense = sorted(phases, key=lambda phase: phase.rho())
    feed, incipient = (light, dense) if dew else (dense, light)
    if max(abs(a - b) for a, b in zip(feed.zs, zs)) > 1e-6:
        return None
    differs = max(abs(a - b) for a, b in zip(incipient.zs, zs)) > 1e-4
    if not differs and dense.rho() < 1.01 * light.rho():
        return None
    return incipient


def thermo_dew_bubble(z: Mapping[str, float], P: float, *, gas: str = "peng-robinson",
                      quantum_correction: bool = True) -> SaturationPoints:
    """thermo's dew and bubble temperatures of feed ``z`` at P [Pa]; None where thermo finds no such point.

    A gas holding much H2 has no bubble point at loop pressures (thermo then
    fails or returns the trivial answer, both reported as None).
    """
    names, zs = _split(z)
    dew = _saturation(names, zs, P, 1.0, gas, quantum_correction)
    bubble = _saturation(names, zs, P, 0.0, gas, quantum_correction)
    return SaturationPoints(dew[0] if dew else None, dew[1] if dew else None,
                            bubble[0] if bubble else None, bubble[1] if bubble else None)


# -- invented flash conditions ----------------------------------------------------------------------
# Amounts in mol (any scale). Each base mixture is ours: round numbers of the kind of stream named.

METHANOL_CONVERTER_OUTLET = {"H2": 55.0, "CO": 3.0, "CO2": 5.0, "CH4": 10.0, "N2": 2.0, "H2O": 5.0, "CH3OH": 20.0}
METHANOL_LEAN_OUTLET = {"H2": 68.0, "CO": 6.0, "CO2": 7.0, "CH4": 11.0, "N2": 1.0, "H2O": 2.0, "CH3OH": 5.0}
AMMONIA_CONVERTER_OUTLET = {"H2": 54.0, "N2": 18.0, "NH3": 18.0, "CH4": 6.0, "Ar": 4.0}
AMMONIA_RICH_OUTLET = {"H2": 48.0, "N2": 16.0, "NH3": 26.0, "CH4": 6.0, "Ar": 4.0}
SHIFT_OUTLET = {"H2": 45.0, "CO": 0.5, "CO2": 15.0, "CH4": 0.5, "N2": 0.5, "H2O": 38.5}

_C = 273.15
FLASH_CASES: list[tuple[str, dict[str, float], float, float]] = [
    *(
        (f"methanol separator {label} {t:g} degC {p:g} bar", z, t + _C, p * 1e5)
        for (label, z), t, p in itertools.product(
            (("outlet", METHANOL_CONVERTER_OUTLET), ("lean outlet", METHANOL_LEAN_OUTLET)),
            (30.0, 40.0, 50.0), (60.0, 80.0, 100.0))
    ),
    *(
        (f"ammonia separator {label} {t:g} degC {p:g} bar", z, t + _C, p * 1e5)
        for (label, z), t, p in itertools.product(
            (("outlet", AMMONIA_CONVERTER_OUTLET), ("rich outlet", AMMONIA_RICH_OUTLET)),
            (-25.0, -15.0, -5.0), (150.0, 200.0))
    ),
    *(
        (f"ammonia letdown {t:g} degC {p:g} bar", AMMONIA_RICH_OUTLET, t + _C, p * 1e5)
        for t, p in itertools.product((-20.0, 0.0, 10.0), (15.0, 25.0))
    ),
    *(
        (f"shift condensate {t:g} degC {p:g} bar", SHIFT_OUTLET, t + _C, p * 1e5)
        for t, p in itertools.product((30.0, 40.0, 60.0, 90.0, 120.0), (20.0, 30.0, 40.0))
    ),
    # Near the methanol outlet's dew point at 80 bar (about 163 degC by PR): little liquid.
    *(
        (f"methanol converter outlet cooling {t:g} degC 80 bar", METHANOL_CONVERTER_OUTLET, t + _C, 80e5)
        for t in (100.0, 150.0, 160.0)
    ),
]


def flash_case(name: str) -> tuple[dict[str, float], float, float]:
    """(z, T [K], P [Pa]) of the case called ``name``."""
    for case in FLASH_CASES:
        if case[0] == name:
            return case[1], case[2], case[3]
    raise KeyError(f"no flash case {name!r}; the names are in tests/flash_reference.py FLASH_CASES")


def mole_fraction_sum_error(result: FlashResult, z: Mapping[str, float]) -> float:
    """Largest |beta y_i + (1 - beta) x_i - z_i| of a flash result, the material balance [-]."""
    names, zs = _split(z)
    beta = result.vapour_fraction
    worst = 0.0
    for name, zi in zip(names, zs):
        yi = result.y[name] if result.y else 0.0
        xi = result.x[name] if result.x else 0.0
        worst = max(worst, abs(beta * yi + (1.0 - beta) * xi - zi))
    return worst if math.isfinite(worst) else math.inf


def thermo_phase(amounts: Mapping[str, float], T: float, P: float, *, root: str = "gas",
                 gas: str = "peng-robinson", quantum_correction: bool = True):
    """thermo's CEOSGas (``root="gas"``) or CEOSLiquid (any other phase name) of ``amounts`` [mol] as one phase
    at T [K], P [Pa], with gibbsmin's constants and kij; the species with no amount are left out."""
    present = {name: n for name, n in amounts.items() if n > 0.0}
    names, zs = _split(present)
    Tc, Pc, omega = _constants_at(names, T, quantum_correction)
    kij = shipped_kij_matrix(gas, list(names))
    n = len(names)
    given = {"Tcs": Tc, "Pcs": Pc, "omegas": omega,
             "kijs": kij.tolist() if kij is not None else [[0.0] * n for _ in range(n)]}
    eos = THERMO_CLASSES[gas]
    return (CEOSGas if root == "gas" else CEOSLiquid)(eos, given, T=T, P=P, zs=zs)


def thermo_departure_enthalpy(amounts: Mapping[str, float], T: float, P: float, *, root: str = "gas",
                              gas: str = "peng-robinson", quantum_correction: bool = True) -> float:
    """thermo's residual (departure) enthalpy [J] of ``amounts`` [mol] as one phase at T [K], P [Pa]: on the
    vapour root (``root="gas"``) or the liquid root (any other phase name), gibbsmin's constants and kij."""
    phase = thermo_phase(amounts, T, P, root=root, gas=gas, quantum_correction=quantum_correction)
    return float(phase.H_dep()) * sum(n for n in amounts.values() if n > 0.0)
