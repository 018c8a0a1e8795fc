"""The domain limits of ph-dossier: one place for every range a layer checks.

Every layer reads its limits from here: the engine (what it can solve), the
method-file schema and checks (what a method may state), the analyses (how
far a sweep goes, how finely a crossing is found), the command line, the
manifest (which records the tolerances in force) and the docs (a test keeps
docs/method-format.md in step). This module imports nothing.

A range is ``(low, high)``, both ends allowed.
"""

from __future__ import annotations

__all__ = [
    "PKA_ENGINE",
    "SALT_EQUAL_AMOUNTS_REL",
    "PKA_STATED",
    "PKA_CONVERTED",
    "TEMPERATURE",
    "TEMPERATURE_TOLERANCE",
    "TOTAL_ENGINE",
    "CONCENTRATION",
    "BACKGROUND_ENGINE",
    "BACKGROUND",
    "PKW_OVERRIDE",
    "ENTHALPY",
    "HEAT_CAPACITY",
    "CHARGE",
    "MAX_STEPS",
    "ION_SIZE",
    "DAVIES_COEFFICIENT_RANGE",
    "CO2_PARTIAL_PRESSURE",
    "TARGET_PH",
    "PKA_UNCERTAINTY",
    "MOLAR_MASS",
    "MAX_PH_ERROR",
    "PROBABILITY",
    "PERCENT_TOLERANCE",
    "DRAWS",
    "SWEEP_CONCENTRATION",
    "SWEEP_PKA",
    "VALIDITY_CONCENTRATION_REL_TOLERANCE",
    "VALIDITY_PKA_TOLERANCE",
    "DRAW_TRUNCATION_SIGMAS",
    "ACTIVITY_MODEL_RANGE",
    "MODEL_RANGE_REFUSAL_FACTOR",
    "ROBUSTNESS_COMPONENT_PERCENT",
    "ROBUSTNESS_STRONG_ADDITION",
    "ROBUSTNESS_TEMPERATURE_STEP",
    "describe",
]

# ---------------------------------------------------------------- the engine
PKA_ENGINE = (-5.0, 20.0)
"""pKa values the engine solves (25 °C, I = 0) [dimensionless]; also the
bound on every Monte-Carlo draw and every point of a pKa sweep."""
TEMPERATURE = (0.0, 100.0)
"""Temperatures, in the engine and in method files [°C]."""
TOTAL_ENGINE = (0.0, 20.0)
"""Concentrations of components, strong acid and strong base in the engine [mol/L]."""
BACKGROUND_ENGINE = (0.0, 10.0)
"""Background ionic strength in the engine [mol/kg]."""
PKW_OVERRIDE = (10.0, 18.0)
"""An override of pKw [dimensionless]."""
ENTHALPY = (-300.0, 300.0)
"""Standard enthalpy of ionization ΔH° [kJ/mol]."""
HEAT_CAPACITY = (-2000.0, 2000.0)
"""Standard heat-capacity change of ionization ΔCp° [J/(K·mol)]."""
CHARGE = (-6, 6)
"""Charge of the fully protonated form of a protolyte."""
MAX_STEPS = 6
"""Largest number of ionization steps of one protolyte."""
ION_SIZE = (0.5, 20.0)
"""Ion-size parameter å of the extended Debye–Hückel equation [Å]."""
DAVIES_COEFFICIENT_RANGE = (0.0, 1.0)
"""Linear coefficient of the Davies equation [kg/mol]."""
CO2_PARTIAL_PRESSURE = (0.0, 1.0)
"""CO₂ partial pressure of an open solution [atm]: at most pure CO₂ at 1 atm,
the pressure at which Henry's constant holds."""
TARGET_PH = (0.0, 14.0)
"""Target pH of ``adjusted_to`` in a method file [pH]."""

# ---------------------------------------------------------------- method files
PKA_STATED = (-2.0, 16.0)
"""A pKa as a method file states it [dimensionless]."""
PKA_CONVERTED = (-4.0, 18.0)
"""A stated pKa once converted to 25 °C and I = 0 [dimensionless]."""
CONCENTRATION = (1e-10, 10.0)
"""Nominal concentrations and working ranges in a method file [mol/L]."""
BACKGROUND = (0.0, 5.0)
"""Background ionic strength and the ionic strength of a stated pKa in a method file [mol/kg]."""
TEMPERATURE_TOLERANCE = (0.0, 20.0)
"""Half-width of the working temperature [°C]."""
MOLAR_MASS = (0.0, 5000.0)
"""A molar mass stated in a method file [g/mol] (the low end excluded)."""
PKA_UNCERTAINTY = (0.0, 2.0)
"""Standard uncertainty of a pKa [pKa units]."""
MAX_PH_ERROR = (0.0, 2.0)
"""Acceptance limit on |shortcut pH − exact pH| [pH]; the low end is excluded."""
PROBABILITY = (0.5, 0.9999)
"""Required probability of conformity [1]."""
PERCENT_TOLERANCE = (0.0, 50.0)
"""A concentration tolerance given as a percentage [%]."""
DRAWS = (1_000, 100_000_000)
"""Monte-Carlo draws per solution (command line)."""

# ---------------------------------------------------------------- the analyses
SWEEP_CONCENTRATION = (1e-10, 10.0)
"""Sweep of the first component's total in a validity analysis [mol/L]."""
SWEEP_PKA = (-2.0, 16.0)
"""Sweep of the key step's pKa in a validity analysis [dimensionless]."""
VALIDITY_CONCENTRATION_REL_TOLERANCE = 1e-3
"""Relative tolerance to which a validity interval's end is found in concentration (0.1 %)."""
VALIDITY_PKA_TOLERANCE = 1e-3
"""Tolerance to which a validity interval's end is found in pKa."""
SALT_EQUAL_AMOUNTS_REL = 0.10
"""How far apart (relative) the amounts of a weak acid and a weak base may be
for the salt formula ½(pKa,HA + pKa,BH⁺) to count as the procedure's
calculation: a 1:1 salt made up within its tolerances, as the uncertainty
analyses draw it, is still "the salt"; its error there is what they measure
(a design choice of this tool, no source)."""
DRAW_TRUNCATION_SIGMAS = 8.0
"""A normal draw is truncated at this many standard uncertainties (the
probability beyond is below 1e-15), so that no draw leaves the range the
method file was checked for."""


# ---------------------------------------------------------------- the activity models' ranges
ACTIVITY_MODEL_RANGE: dict[str, float | None] = {
    "ideal": None,
    "debye-huckel": 0.005,
    "extended-debye-huckel": 0.1,
    "davies": 0.5,
}
"""Largest ionic strength at which each activity model is used in practice [mol/kg].

The ideal model has no range: it is an approximation at every ionic
strength (None). The other values are the customary upper ends:

- Debye–Hückel limiting law, I ≤ 0.005 mol/kg;
- extended Debye–Hückel equation, I ≤ 0.1 mol/kg — the range of the
  Bates–Guggenheim convention (R. G. Bates and E. A. Guggenheim, Pure Appl.
  Chem. 1, 163–168 (1960), which defines the convention for I ≤ 0.1 mol/kg);
- Davies equation, I ≤ 0.5 mol/kg (C. W. Davies, Ion Association,
  Butterworths, London, 1962, p. 41, where the equation is offered for
  dilute solutions and tested up to about 0.1 mol/kg; 0.5 mol/kg is the
  customary upper end).

The three values are tabulated together in W. Stumm and J. J. Morgan, Aquatic
Chemistry, 3rd ed. (Wiley, New York, 1996), Table 3.3 — recalled from
memory, not checked against the book. Keys are the activity-model ids of
:mod:`dossier.chemistry.activity`.
"""
MODEL_RANGE_REFUSAL_FACTOR = 4.0
"""`check` refuses an ionic strength more than this many times the activity
model's range (:data:`ACTIVITY_MODEL_RANGE`); between the range and this
factor it warns. Common practice, no source."""


# ---------------------------------------------------------------- buffer robustness
ROBUSTNESS_COMPONENT_PERCENT = 2.0
"""Variation of one component on its own when the method states no tolerance
for it [%] (the robustness table's ±x %). Common practice, no source."""
ROBUSTNESS_STRONG_ADDITION = 1e-3
"""Small addition of strong acid and of strong base in the robustness table
[mol per litre of solution] (1 mmol/L). Common practice, no source."""
ROBUSTNESS_TEMPERATURE_STEP = 1.0
"""Half-width of the temperature step for dpH/dT when the method states no
temperature tolerance [°C]."""


def describe(limits: tuple[float, float], unit: str = "") -> str:
    """A range for messages: ``0 … 100 °C``.

    Examples
    --------
    >>> describe(TEMPERATURE, "°C")
    '0 … 100 °C'
    >>> describe(CONCENTRATION, "mol/L")
    '1e-10 … 10 mol/L'
    """
    lo, hi = limits
    text = f"{lo:g} … {hi:g}"
    return f"{text} {unit}" if unit else text
