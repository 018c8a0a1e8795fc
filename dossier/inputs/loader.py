"""Load method files: read → YAML with positions → unknown keys → types →
checks → frozen :class:`~dossier.inputs.model.Method`.

Every problem of every file is collected and returned; nothing here raises
on bad input and nothing prints.
"""

from __future__ import annotations

import hashlib
import os
import typing
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import annotated_types
from pydantic import BaseModel, ValidationError
from pydantic.fields import FieldInfo

from ..problems import Problem, Severity, has_errors
from .checks import build_method, check_valid_parts, closest, did_you_mean, dotted
from .model import Method
from .schema import FORMAT, ID_RULE, MethodFile
from .substances import SubstanceTable, load_table
from .units import ALLOWED_UNITS
from .yamlpos import MAX_BYTES, LoadedYaml, YamlError, load_yaml

__all__ = ["MethodLoad", "DossierInputs", "load_method", "load_paths", "find_method_files", "METHOD_SUFFIXES"]

METHOD_SUFFIXES = (".yaml", ".yml")

Loc = tuple[str | int, ...]


@dataclass(frozen=True)
class MethodLoad:
    """The outcome of loading one file: the method (None on error) and its problems."""

    path: str
    method: Method | None
    problems: tuple[Problem, ...]


@dataclass(frozen=True)
class DossierInputs:
    """Every method file of a dossier, loaded and cross-checked."""

    loads: tuple[MethodLoad, ...]
    problems: tuple[Problem, ...]

    @property
    def methods(self) -> tuple[Method, ...]:
        return tuple(m.method for m in self.loads if m.method is not None)

    @property
    def ok(self) -> bool:
        return not has_errors(self.problems)


# ---------------------------------------------------------------- schema walking
def _unwrap(annotation: Any) -> Any:
    """Strip Optional/Annotated layers down to the model, list or dict type."""
    while True:
        origin = typing.get_origin(annotation)
        if origin is typing.Annotated:
            annotation = typing.get_args(annotation)[0]
            continue
        if origin in (typing.Union, getattr(__import__("types"), "UnionType", None)):
            args = [a for a in typing.get_args(annotation) if a is not type(None)]
            models = [a for a in args if isinstance(a, type) and issubclass(a, BaseModel)]
            if models:
                annotation = models[0]
                continue
            if len(args) == 1:
                annotation = args[0]
                continue
        return annotation


def _field_at(loc: Loc) -> FieldInfo | None:
    """The pydantic field at a location of MethodFile (list indices and dict keys skipped)."""
    current: Any = MethodFile
    info: FieldInfo | None = None
    for part in loc:
        ann = _unwrap(current)
        origin = typing.get_origin(ann)
        if isinstance(ann, type) and issubclass(ann, BaseModel):
            if not isinstance(part, str) or part not in ann.model_fields:
                return None
            info = ann.model_fields[part]
            current = info.annotation
        elif origin in (list, tuple):
            current = typing.get_args(ann)[0]
        elif origin is dict:
            current = typing.get_args(ann)[1]
        else:
            return info
    return info


def _union_model_for(annotation: Any, data: Any) -> Any:
    """For a union of several models (``co2: {partial_pressure: …} | {dissolved: …}``),
    the one whose keys the data uses; otherwise the annotation unchanged."""
    while typing.get_origin(annotation) is typing.Annotated:
        annotation = typing.get_args(annotation)[0]
    if not isinstance(data, dict) or typing.get_origin(annotation) not in (typing.Union, getattr(__import__("types"), "UnionType", None)):
        return annotation
    models = [a for a in typing.get_args(annotation) if isinstance(a, type) and issubclass(a, BaseModel)]
    if len(models) < 2:
        return annotation
    return max(models, key=lambda m: sum(k in m.model_fields for k in data))


def _union_forms(annotation: Any) -> dict[str, type[BaseModel]]:
    """{key: model} of the mapping forms of a union (``{partial_pressure: …}``,
    ``{dissolved: …}``), each model known by its first key; {} when not such a union."""
    return {next(iter(m.model_fields)): m for m in _union_members(annotation)
            if isinstance(m, type) and issubclass(m, BaseModel) and m.model_fields}


def _forms_of_key(loc: Loc) -> dict[str, type[BaseModel]]:
    """The mapping forms (:func:`_union_forms`) of the field that holds key ``loc[-1]``,
    when that key names one of them; else {}."""
    parent = _field_at(loc[:-1])
    forms = _union_forms(parent.annotation) if parent is not None else {}
    return forms if loc[-1] in forms else {}


def _strip_unknown(data: Any, model: Any, loc: Loc, doc: LoadedYaml, out: list[Problem], path: str) -> Any:
    """Drop keys the schema does not know, each with a warning (and a suggestion)."""
    ann = _unwrap(_union_model_for(model, data))
    origin = typing.get_origin(ann)
    if isinstance(ann, type) and issubclass(ann, BaseModel) and isinstance(data, dict):
        cleaned = {}
        by_key = {(f.alias or name): f for name, f in ann.model_fields.items()}  # as written in the file ('with')
        forms = _union_forms(model)  # the other mapping forms, when this mapping is one of several
        for key, value in data.items():
            if key in by_key:
                cleaned[key] = _strip_unknown(value, by_key[key].annotation, loc + (key,), doc, out, path)
            else:
                pos = doc.keys.get(loc + (key,), doc.where(loc + (key,)))
                known = [*by_key, *(k for k in forms if k not in by_key)]
                close = closest(str(key), known)
                if key in forms:
                    hint = f"; {dotted(loc)} takes one of {' or '.join(repr(k) for k in forms)}, not both"
                else:
                    hint = f"; did you mean {close!r}?" if close else f"; known keys here: {', '.join(known)}"
                out.append(Problem(path, pos.line, pos.column, dotted(loc + (key,)), f"unknown key {key!r} (ignored){hint}", Severity.WARNING))
        return cleaned
    if origin in (list, tuple) and isinstance(data, list):
        item = typing.get_args(ann)[0]
        return [_strip_unknown(v, item, loc + (i,), doc, out, path) for i, v in enumerate(data)]
    if origin is dict and isinstance(data, dict):
        item = typing.get_args(ann)[1]
        return {k: _strip_unknown(v, item, loc + (k,), doc, out, path) for k, v in data.items()}
    return data


# ---------------------------------------------------------------- messages
def _bounds(info: FieldInfo | None) -> tuple[str, str]:
    """('from 0 to 100', ' °C') style text for a numeric field's range."""
    if info is None:
        return "", ""
    lo = hi = None
    lo_open = hi_open = False
    for m in info.metadata:
        if isinstance(m, annotated_types.Ge):
            lo = m.ge
        elif isinstance(m, annotated_types.Gt):
            lo, lo_open = m.gt, True
        elif isinstance(m, annotated_types.Le):
            hi = m.le
        elif isinstance(m, annotated_types.Lt):
            hi, hi_open = m.lt, True
    extra = info.json_schema_extra if isinstance(info.json_schema_extra, dict) else {}
    unit = f" {extra['unit']}" if "unit" in extra else ""
    if lo is None and hi is None:
        return "", unit
    if lo is None:
        return (f"below {hi:g}" if hi_open else f"at most {hi:g}"), unit
    if hi is None:
        return (f"above {lo:g}" if lo_open else f"at least {lo:g}"), unit
    if not lo_open and not hi_open:
        return f"from {lo:g} to {hi:g}", unit
    low = f"above {lo:g}" if lo_open else f"at least {lo:g}"
    high = f"below {hi:g}" if hi_open else f"at most {hi:g}"
    return f"{low} and {high}", unit


def _show(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


_CONCENTRATION_KEYS = {"concentration", "working_range", "tolerance", "strong_acid", "strong_base"}


def _is_concentration(loc: Loc) -> bool:
    """Whether ``loc`` is a concentration: its key, or the list's key when it is an entry
    (``working_range[0]``); not another key beside one (``strong_acid.name``)."""
    key = loc[-2] if len(loc) > 1 and isinstance(loc[-1], int) else loc[-1] if loc else None
    return key in _CONCENTRATION_KEYS


def _message(err: dict[str, Any]) -> str:
    kind = err["type"]
    loc = tuple(p for p in err["loc"])
    info = _field_at(loc)
    value = err.get("input")
    rng, unit = _bounds(info)
    is_int = info is not None and _unwrap(info.annotation) is int
    noun = "a whole number" if is_int else "a number"
    if kind == "missing" and (forms := _forms_of_key(loc)):
        said = {k: (m.__doc__ or "").strip().splitlines()[0].rstrip(".") for k, m in forms.items()}
        return "as a mapping, needs one of the keys " + " or ".join(f"{k!r} ({d[:1].lower()}{d[1:]})" for k, d in said.items())
    if kind == "missing":
        desc = f" ({info.description.rstrip('.')})" if info is not None and info.description else ""
        return f"required key {loc[-1]!r} is missing{desc}"
    if kind in ("float_type", "float_parsing", "int_type", "int_parsing", "int_from_float", "finite_number",
                "greater_than", "greater_than_equal", "less_than", "less_than_equal"):
        where = f" {rng}{unit}" if rng else ""
        return f"must be {noun}{where}; got {_show(value)}"
    if kind == "literal_error":
        expected = err.get("ctx", {}).get("expected", "")
        choices = [c.strip().strip("'") for c in expected.replace(" or ", ",").split(",") if c.strip()]
        hint = did_you_mean(value, choices) if isinstance(value, str) else ""
        if loc == ("format",):
            return f"must be {FORMAT!r} (the format version this tool reads); got {_show(value)}"
        if loc[-2:] == ("adjusted_to", "with"):
            return (f"must be one of {', '.join(choices)}, or a substance and its form ({{substance: phosphoric-acid, form: 2}}); "
                    f"got {_show(value)}{hint}")
        if info is not None and (forms := _union_forms(info.annotation)):
            return f"must be {', '.join([*choices, *(f'{{{k}: …}}' for k in forms)][:-1])} or {{{list(forms)[-1]}: …}}; got {_show(value)}{hint}"
        return f"must be one of {', '.join(choices)}; got {_show(value)}{hint}"
    if kind == "string_pattern_mismatch":
        return f"must be {ID_RULE}; got {_show(value)}"
    if kind in ("string_type",):
        if _is_concentration(loc) and isinstance(value, (int, float)) and not isinstance(value, bool):
            if loc[-1] == "tolerance":
                return f"needs a unit: write e.g. '{value} %' (of the concentration) or '{value} mmol/L' (allowed: %, {ALLOWED_UNITS})"
            return f"needs a unit: write e.g. '{value} mmol/L' (allowed: {ALLOWED_UNITS})"
        return f"must be text; got {_show(value)}"
    if kind == "string_too_short":
        return "must not be empty"
    if kind == "string_too_long":
        return f"is too long (at most {err['ctx']['max_length']} characters)"
    if kind == "too_short":
        n = err["ctx"]["min_length"]
        return f"needs at least {n} entr{'y' if n == 1 else 'ies'}; got {err['ctx']['actual_length']}"
    if kind == "too_long":
        n = err["ctx"]["max_length"]
        return f"allows at most {n} entr{'y' if n == 1 else 'ies'}; got {err['ctx'].get('actual_length', 'more')}"
    if kind == "list_type":
        return f"must be a list; got {_show(value)}"
    if kind in ("model_type", "dict_type", "model_attributes_type"):
        return f"must be a mapping of keys and values; got {_show(value)}"
    if kind == "bool_type":
        return f"must be true or false; got {_show(value)}"
    if kind == "value_error":
        return str(err["ctx"]["error"])
    return err["msg"]  # pragma: no cover - every kind the schema can raise is handled above


def _union_members(annotation: Any) -> list[Any]:
    """The members of a union of two or more types (None left out), else []."""
    def flat(a: Any) -> list[Any]:
        while typing.get_origin(a) is typing.Annotated:
            a = typing.get_args(a)[0]
        if typing.get_origin(a) in (typing.Union, getattr(__import__("types"), "UnionType", None)):
            return [m for arg in typing.get_args(a) if arg is not type(None) for m in flat(arg)]
        return [a]

    members = flat(annotation)
    return members if len(members) > 1 else []


def _untagged(loc: Loc, data: Any) -> Loc | None:
    """The error's location without pydantic's union-member tags, or None when the
    error belongs to a member the data does not use (a mapping uses the model
    whose keys it has, :func:`_union_model_for`; any other value the non-model members)."""
    current: Any = MethodFile
    value = data
    out: list[str | int] = []
    i = 0
    while i < len(loc):
        members = _union_members(current)
        if members and isinstance(loc[i], str):
            models = [m for m in members if isinstance(m, type) and issubclass(m, BaseModel)]
            chosen = max(models, key=lambda m: sum(k in m.model_fields for k in value)) if isinstance(value, dict) and models else None
            if chosen is not None:
                if loc[i] != chosen.__name__:
                    return None
                current = chosen
            elif loc[i] in {m.__name__ for m in models}:
                return None
            else:
                current = next((m for m in members if m not in models), members[0])
            i += 1
            continue
        part = loc[i]
        ann = _unwrap(current)
        origin = typing.get_origin(ann)
        if isinstance(ann, type) and issubclass(ann, BaseModel) and isinstance(part, str):
            info = ann.model_fields.get(part) or next((f for f in ann.model_fields.values() if f.alias == part), None)
            current = info.annotation if info is not None else Any
            value = value.get(part) if isinstance(value, dict) else None
        elif origin in (list, tuple) and isinstance(part, int):
            current = typing.get_args(ann)[0]
            value = value[part] if isinstance(value, list) and part < len(value) else None
        elif origin is dict:
            current = typing.get_args(ann)[1]
            value = value.get(part) if isinstance(value, dict) else None
        else:
            current = Any
            value = None
        out.append(part)
        i += 1
    return tuple(out)


def _type_problems(exc: ValidationError, doc: LoadedYaml, path: str, data: Any = None) -> list[Problem]:
    out = []
    for err in exc.errors(include_url=False):
        loc: Loc | None = _untagged(tuple(err["loc"]), data)
        if loc is None:
            continue
        err = {**err, "loc": loc}
        pos = doc.where(loc[:-1] if err["type"] == "missing" else loc)
        shown = loc[:-1] if err["type"] == "missing" and _forms_of_key(loc) else loc  # the mapping, not the key it lacks
        out.append(Problem(path, pos.line, pos.column, dotted(shown), _message(err)))
    return out


# ---------------------------------------------------------------- files
def _display(path: Path) -> str:
    try:
        rel = os.path.relpath(path)
    except ValueError:  # another drive (Windows)
        return str(path)
    return rel if not rel.startswith("..") else str(path)


def load_method(path: str | Path, *, table: SubstanceTable | None = None) -> MethodLoad:
    """Load and check one method file.

    Parameters
    ----------
    path : str or Path
    table : SubstanceTable, optional
        Defaults to the bundled table.

    Returns
    -------
    MethodLoad
        The method (None if any error) and every problem found.
    """
    p = Path(path)
    name = _display(p)
    table = table or load_table()
    try:
        size = p.stat().st_size
        if size > MAX_BYTES:
            return MethodLoad(name, None, (Problem(name, 1, 1, "", f"file is {size} bytes; the limit is {MAX_BYTES} bytes (1 MiB)"),))
        raw = p.read_bytes()
    except OSError as exc:
        return MethodLoad(name, None, (Problem(name, 0, 0, "", f"cannot read the file: {exc.strerror or exc}"),))
    return load_method_bytes(raw, name, table=table)


def load_method_bytes(raw: bytes, name: str, *, table: SubstanceTable | None = None) -> MethodLoad:
    """Load and check a method file's content (``name`` is used in messages)."""
    table = table or load_table()
    sha = hashlib.sha256(raw).hexdigest()
    try:
        doc = load_yaml(raw)
    except YamlError as exc:
        return MethodLoad(name, None, (Problem(name, exc.position.line, exc.position.column, "", str(exc)),))
    problems: list[Problem] = []
    for loc, pos in doc.duplicates:
        problems.append(Problem(name, pos.line, pos.column, dotted(loc), f"key {loc[-1]!r} appears twice in the same mapping; the second is ignored"))
    if not isinstance(doc.data, dict):
        what = "empty" if doc.data is None else f"a {type(doc.data).__name__}, not a mapping of keys"
        problems.append(Problem(name, 1, 1, "", f"the file is {what}: a method file starts with 'format: {FORMAT}' (see `dossier new`)"))
        return MethodLoad(name, None, tuple(problems))
    data = _strip_unknown(doc.data, MethodFile, (), doc, problems, name)
    try:
        mf = MethodFile.model_validate(data)
    except ValidationError as exc:
        problems.extend(_type_problems(exc, doc, name, data))
        problems.extend(check_valid_parts(name, data, doc, table))
        return MethodLoad(name, None, tuple(problems))
    method, more = build_method(name, sha, mf, doc, table)
    problems.extend(more)
    if has_errors(problems):
        method = None
    return MethodLoad(name, method, tuple(problems))


def find_method_files(paths: list[str | Path]) -> tuple[list[Path], list[Problem]]:
    """Expand folders into the method files they hold (sorted; hidden files skipped)."""
    files: list[Path] = []
    problems: list[Problem] = []
    for given in paths:
        p = Path(given)
        if p.is_dir():
            found = sorted(
                f for f in p.rglob("*")
                if f.suffix in METHOD_SUFFIXES and f.is_file() and not any(part.startswith(".") for part in f.relative_to(p).parts)
            )
            if not found:
                problems.append(Problem(_display(p), 0, 0, "", f"no method files ({', '.join(METHOD_SUFFIXES)}) in this folder", Severity.WARNING))
            files.extend(found)
        elif p.exists():
            files.append(p)
        else:
            problems.append(Problem(_display(p), 0, 0, "", "no such file or folder"))
    unique = list(dict.fromkeys(f.resolve() for f in files))
    return [Path(os.path.relpath(f)) if not os.path.relpath(f).startswith("..") else f for f in unique], problems


def load_paths(paths: list[str | Path], *, strict: bool = False, table: SubstanceTable | None = None) -> DossierInputs:
    """Load every method file under ``paths`` and check them together.

    Parameters
    ----------
    paths : list of str or Path
        Files or folders.
    strict : bool
        Turn every warning into an error.
    table : SubstanceTable, optional

    Returns
    -------
    DossierInputs
    """
    table = table or load_table()
    files, problems = find_method_files(paths)
    loads = [load_method(f, table=table) for f in files]
    seen: dict[str, tuple[str, str]] = {}  # id folded to lower case → (id as written, file)
    for ld in loads:
        problems.extend(ld.problems)
        if ld.method is None:
            continue
        mid = ld.method.id
        if mid.casefold() in seen:
            first_id, first_path = seen[mid.casefold()]
            pos = _id_position(ld)
            problems.append(Problem(ld.path, pos[0], pos[1], "method.id", _duplicate_id_message(mid, first_id, first_path)))
        else:
            seen[mid.casefold()] = (mid, ld.path)
    if strict:
        problems = [p.as_error() for p in problems]
    if has_errors(problems):
        bad = {p.file for p in problems if p.severity is Severity.ERROR}
        loads = [MethodLoad(ld.path, None if ld.path in bad else ld.method, ld.problems) for ld in loads]
    return DossierInputs(tuple(loads), tuple(problems))


def _duplicate_id_message(mid: str, first_id: str, first_path: str) -> str:
    if mid == first_id:
        return f"method id {mid!r} is also used by {first_path}; ids must be unique in a dossier"
    return (
        f"method id {mid!r} differs only in case from {first_id!r} in {first_path}; a case-insensitive file system "
        "would give both reports one folder: ids must differ by more than case"
    )


def _id_position(ld: MethodLoad) -> tuple[int, int]:
    try:
        doc = load_yaml(Path(ld.path).read_bytes())
    except (OSError, YamlError):
        return (0, 0)
    pos = doc.where(("method", "id"))
    return (pos.line, pos.column)
