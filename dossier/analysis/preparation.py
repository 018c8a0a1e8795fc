r"""How to make a solution: the mass of each component to weigh and the
volume of each titrant, per litre of final solution (numbers only).

For a component the mass per litre is

.. math::
    m = c \, M_\text{weighed}

with *c* the nominal total concentration [mol/L] and *M* the molar mass of
the compound weighed [g/mol]: the form's compound in the substance table, or
the compound the method names with ``weighed_as:`` (a hydrate, or a salt of
another alkali cation). The molar mass comes from the compound's formula
(IUPAC abridged standard atomic weights, :mod:`dossier.inputs.formulas`), so
a counter-ion and water of crystallisation count. A concentration the method
file writes as a mass (g/L, mg/L, % w/v) was converted to mol/L with that
same molar mass at load time, so the mass here is the stated one.

For a titrant (a stated strong acid or base, and the amount ``adjusted_to``
adds by the exact model) the volume of stock per litre is

.. math::
    V = 1000 \, n / c_\text{stock} \quad [\text{mL/L}]

with *n* the amount per litre of final solution [mol/L]; the volume change on
mixing is neglected (common practice, no source): the solution is made up to
the mark after the additions. A weak titrant (``adjusted_to.with`` a substance
and its form) is the solution's last component; it is listed as a titrant,
not among the components to weigh, with its form's compound, molar mass and
the mass it amounts to (m = n·M, for weighing it instead of a stock).
"""

from __future__ import annotations

from dataclasses import dataclass

from ..inputs.formulas import water_of_crystallisation
from ..inputs.model import ComponentSpec, SolutionSpec

__all__ = ["WeighedComponent", "TitrantVolume", "Preparation", "preparation"]

_SIGNIFICANT = 12
"""Digits a mass keeps: m = c·M undoes the load's g/L → mol/L to the last bit or two."""


@dataclass(frozen=True)
class WeighedComponent:
    """One component to weigh, per litre of final solution.

    Attributes
    ----------
    index : int
        Position of the component in the solution (0-based).
    substance, name : str
        The substance's id as written and its name.
    compound : str
        The compound weighed (the form's compound, or ``weighed_as``).
    formula : str or None
        Its formula as the table writes it (None: a form the table does not list).
    water : int
        Molecules of water of crystallisation in that formula.
    molar_mass_g_per_mol : float or None
        Molar mass of the compound weighed (None when neither the table nor the file gives one).
    amount_mol_per_l : float
        Nominal total concentration [mol/L].
    mass_g_per_l : float or None
        Mass to weigh per litre [g/L] (None without a molar mass).
    stated_mass : bool
        True when the method file writes the concentration as a mass of the
        compound weighed (the mass is the stated one); False when converted from mol/L or mol/kg.
    as_written : str
        The concentration as the method file writes it.
    """

    index: int
    substance: str
    name: str
    compound: str
    formula: str | None
    water: int
    molar_mass_g_per_mol: float | None
    amount_mol_per_l: float
    mass_g_per_l: float | None
    stated_mass: bool
    as_written: str


@dataclass(frozen=True)
class TitrantVolume:
    """A strong acid or base to measure out, per litre of final solution.

    Attributes
    ----------
    role : str
        ``strong_acid`` or ``strong_base`` (stated in the method file), or
        ``adjustment`` (the amount ``adjusted_to`` adds by the exact model).
    titrant : str
        ``strong-acid`` or ``strong-base``.
    amount_mol_per_l : float
        Amount per litre of final solution [mol/L].
    stock_mol_per_l : float or None
        Stock concentration, when the method states one.
    volume_ml_per_l : float or None
        Volume of stock per litre of final solution [mL/L], when a stock is stated.
    target_ph : float or None
        For ``adjustment``: the target pH.
    weighed : WeighedComponent or None
        A weak titrant: its form's compound, molar mass and mass per litre
        (the component that holds it); None for a strong acid or base.
    """

    role: str
    titrant: str
    amount_mol_per_l: float
    stock_mol_per_l: float | None
    volume_ml_per_l: float | None
    target_ph: float | None = None
    weighed: WeighedComponent | None = None


@dataclass(frozen=True)
class Preparation:
    """What to weigh and measure out for one litre of a solution."""

    components: tuple[WeighedComponent, ...]
    titrants: tuple[TitrantVolume, ...]


def _weighed(index: int, c: ComponentSpec) -> WeighedComponent:
    compound, formula, molar_mass = c.mass_basis
    mass = None if molar_mass is None else float(f"{c.concentration * molar_mass:.{_SIGNIFICANT}g}")
    water = c.weighed_water if c.weighed_compound is not None else _water(formula)
    return WeighedComponent(index, c.substance, c.name, compound, formula, water, molar_mass, c.concentration, mass,
                            c.concentration_kind == "mass", c.concentration_text)


def _water(formula: str | None) -> int:
    return water_of_crystallisation(formula) if formula else 0


def _volume(amount: float, stock: float | None) -> float | None:
    return None if stock is None else 1000.0 * amount / stock


def preparation(spec: SolutionSpec) -> Preparation:
    """The preparation of one litre of a checked solution.

    Parameters
    ----------
    spec : SolutionSpec
        With ``adjustment``, its strong acid or base already includes the
        titrant the exact model adds; the stated part and the adjustment are
        listed apart.

    Returns
    -------
    Preparation

    Examples
    --------
    Sodium acetate trihydrate, C₂H₃NaO₂·3H₂O (136.08 g/mol), at 0.1 mol/L:
    13.608 g per litre.

    >>> from dossier.inputs.model import ComponentSpec, SolutionSpec
    >>> c = ComponentSpec("acetic-acid", "acetic acid", True, 0, 1, "base", "sodium acetate", 0.1, "0.1 mol/L",
    ...                   0.0, "", (0.05, 0.2), ("", ""), 82.034, (), "C2H3NaO2",
    ...                   weighed_compound="sodium acetate trihydrate", weighed_formula="C2H3NaO2·3H2O",
    ...                   weighed_molar_mass=136.08, weighed_water=3)
    >>> p = preparation(SolutionSpec("s", "", (c,), 0.0, 0.001, ("exact",), strong_base_stock=0.1))
    >>> p.components[0].mass_g_per_l
    13.608
    >>> p.titrants[0].volume_ml_per_l  # 1 mmol/L of a 0.1 mol/L stock
    10.0
    """
    adj = spec.adjustment
    held = adj.component if adj is not None else None
    components = tuple(_weighed(i, c) for i, c in enumerate(spec.components) if i != held)
    titrants: list[TitrantVolume] = []
    for role, total, stock in (("strong_acid", spec.strong_acid, spec.strong_acid_stock), ("strong_base", spec.strong_base, spec.strong_base_stock)):
        titrant = role.replace("_", "-")
        stated = total - adj.amount if (adj is not None and adj.titrant == titrant) else total
        if stated > 1e-12 * max(total, 1e-300):
            titrants.append(TitrantVolume(role, titrant, stated, stock, _volume(stated, stock)))
    if adj is not None:
        weighed = _weighed(held, spec.components[held]) if held is not None else None
        titrants.append(TitrantVolume("adjustment", adj.titrant, adj.amount, adj.stock, _volume(adj.amount, adj.stock), adj.target_ph, weighed))
    return Preparation(components, tuple(titrants))
