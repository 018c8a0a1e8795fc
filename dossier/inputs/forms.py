"""The form in which a substance is added: the one parser of ``form``.

A component names its form as ``acid`` (fully protonated), ``base`` (every
proton removed) or a whole number of protons removed (``1`` for KH2PO4 from
phosphoric acid). Method files, the schema and the command line all read it
here.

Examples
--------
>>> protons_removed("acid", 3), protons_removed("base", 3), protons_removed("1", 3)
(0, 3, 1)
>>> protons_removed(4, 3)
Traceback (most recent call last):
...
dossier.inputs.forms.FormError: protons removed must be 0 … 3 for a substance with 3 ionization step(s); got 4
"""

from __future__ import annotations

__all__ = ["FORM_WORDS", "FormError", "parse_form", "protons_removed"]

FORM_WORDS = ("acid", "base")
"""The forms named by a word."""


class FormError(ValueError):
    """A form that is not ``acid``, ``base`` or a whole number in range (the message says which)."""


def parse_form(form: object) -> str | int:
    """``acid``, ``base`` or a whole number (from an int or its text), else :class:`FormError`."""
    if isinstance(form, bool):
        raise FormError(f"must be 'acid', 'base' or a whole number of protons removed; got {form!r}")
    if isinstance(form, int) or form in FORM_WORDS:
        return form  # type: ignore[return-value]
    if isinstance(form, str) and form.strip().lstrip("+").isdigit():
        return int(form)
    raise FormError(f"must be 'acid', 'base' or a whole number of protons removed; got {form!r}")


def protons_removed(form: object, steps: int) -> int:
    """The number of protons removed from the fully protonated form (0 … ``steps``).

    Parameters
    ----------
    form : str or int
        ``acid``, ``base`` or a whole number.
    steps : int
        Ionization steps of the substance.
    """
    parsed = parse_form(form)
    if parsed == "acid":
        return 0
    if parsed == "base":
        return steps
    assert isinstance(parsed, int)
    if not 0 <= parsed <= steps:
        raise FormError(f"protons removed must be 0 … {steps} for a substance with {steps} ionization step(s); got {parsed}")
    return parsed
