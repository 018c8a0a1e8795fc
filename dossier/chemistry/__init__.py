"""The chemistry engine: exact acid–base equilibrium, activity, temperature,
and the catalogue of textbook shortcuts. Pure and vectorized: no files, no
templates, no plotting.

The public names below are the stable API (see docs/api.md).
"""

from .activity import MODELS as ACTIVITY_MODELS
from .approximations import CATALOGUE, Approximation, Constants, NotApplicable, StatedConstants, applicable, approximation, working_constants
from .activity import ActivityModel, ActivityModelId, activity_model, conditional_pka, log_gamma, log_gamma_unit, thermodynamic_pka
from .errors import ChemistryError, ConvergenceError, InputRangeError
from .carbonate import AIR_PARTIAL_PRESSURE_ATM, carbonic_pka, log_henry
from .solver import CarbonateState, Equilibrium, buffer_capacity, equilibrium, titrant_for_ph
from .species import CarbonDioxide, Component, Protolyte, Solution
from .temperature import pka_at_temperature
from .water import debye_huckel_a, debye_huckel_b, pkw, pkw_iapws, relative_permittivity, water_density

__all__ = [
    "CATALOGUE",
    "AIR_PARTIAL_PRESSURE_ATM",
    "CarbonDioxide",
    "CarbonateState",
    "buffer_capacity",
    "carbonic_pka",
    "log_henry",
    "titrant_for_ph",
    "Approximation",
    "Constants",
    "StatedConstants",
    "NotApplicable",
    "applicable",
    "approximation",
    "working_constants",
    "ACTIVITY_MODELS",
    "ActivityModel",
    "ActivityModelId",
    "ChemistryError",
    "Component",
    "ConvergenceError",
    "Equilibrium",
    "InputRangeError",
    "Protolyte",
    "Solution",
    "activity_model",
    "conditional_pka",
    "thermodynamic_pka",
    "debye_huckel_a",
    "debye_huckel_b",
    "equilibrium",
    "log_gamma",
    "log_gamma_unit",
    "pka_at_temperature",
    "pkw",
    "pkw_iapws",
    "relative_permittivity",
    "water_density",
]
