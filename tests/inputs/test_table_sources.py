"""The substance table cites published literature only, never software or files.

An auditor accepts a primary measurement paper, a critically evaluated
compilation or a handbook edition as the source of a value; a program's
bundled data file, a code repository, firmware or a web page is not a source.
The names this test refuses are kept as SHA-256 digests of their lower-cased
spelling, so that this file does not name them itself.
"""

from __future__ import annotations

import hashlib
import re
from pathlib import Path

import pytest

from dossier.inputs.substances import STATUS_MEANINGS, STATUSES, TABLE_SOURCE_KINDS, load_table

TABLE = load_table()
ROOT = Path(__file__).resolve().parents[2]

FORBIDDEN_DIGESTS = frozenset({
    "3925198475f898258f0b2e921ffb0db98e5a4fc856f7184e9ca9c5352fa9ddcf",
    "bfbe254256e034550cbda235dae18a6ecff5dad610f3af437b3f39ade57aaeec",
    "ea463464945a0648ead13e4778dbd8e0e6771c53244cc6c53539fc1a19b79756",
    "971c3db4eefefae18289f479bdcb249c9bc87426280a79bb0d82fbee4f014ff7",
    "0ad367052008ac468ceea95d01eae99349498e96ab4e9cae5e13f1f66ede515c",
    "a4fc2a550a6e450d3abf727f2f10a57473ba81066ab0b61bf64f093f3891f182",
    "69177df1b17b785a9f96482517531793df1048022a8a05a5bd774875f1178fc8",
    "9fcce0517bd532f3fe926c043095dbcbc320cc9d5e01a9bc0745f8a5021c2874",
    "378e0ba4d3e2df127e0525505fb653aa4c8a14925e630b67dab368c32dede58e",
    "91326021029852d42c48024c1ddd76dd7173c68b5ce9950832bbaec1e0ca1ef5",
    "73191491de9335f41caafdd61e1a49aefde4db9af8f4e1085de2c18d14fbe1a8",
    "13c766b4d918bb30505236a67541d85807c8d65007317aff571bc93f65bae775",
    "330c149e8e9c2d558e4f239d9dc216f8678502a4193d9c7c8e067f29e25af392",
    "c06ddb0132c37f9c3b51364f6e52648b16dc13d531aafc38b3e39685f6cb48e1",
    "065112d4cebae72c131d0646e8bd813165728d5d066d91c09abee5cd4d2d904e",
    "a43185367e6dede331c5bd8749eac80232c870ab3c3bcc46234acdf44bbed918",
    "eebfdcdd8437061043a235c696c9352667e57a9d578f77a26b0ec9217229eef8",
    "95fece22aad4455abf8345ff036b6724a2e65d7320b37a35017ad45f98746225",
    "cb06231a0856b3ad7c041230b9c4a758812e3a084050c5ed355a8f287812c7b5",
    "a6aeb90d24ddcc5a21b0f105d7d67bdb8682ed464e4b4c9ef20895c20f8b8f22",
    "f7e2fda2f487eeae0b81e9782be237e50c3593f1b42626de0345e297dd29212d",
    "1406cacf53327a5f43c2976890bf3b9fd065b91d7344ed67f1643a9388314a9f",
    "68acebf7ed0f83fe1e8197bab2d3a718225b969d37a0aaefb506d71b3678ae56",
    "cc845ed599e46767ef8f3725e10d691034ff6c4c870d6a8755d289ad14308b56",
    "c670285c12edf4e9bb0ba33ef048ee8716f885e7fd934c3d25afe4d424bf83f8",
    "c0b0109d9439de57fe3cf03abeccbc52f4c98170c732d3b69af5e6395ace574e",
    "8af1c364b2b4005b168ea5121f4cf12f4942a49d938fd45b958355f8395f9555",
    "9d96d9d5b1addd7e7e6119a23b1e5b5f68545312bfecb21d1cdc6af22b8628b8",
    "490414ac86e4c55e14cef6327f283f8cfd68dfb38e5c849214e32115e1170808",
    "05f0fa025a3b026b16bf4f27b2ec6cd299de2ea1c59ecadd653c9c9dc40e5b82",
    "6c2195acfcf70ac3ceb18c72b9d1b890e5182973654f11252c933bf437c1b303",
    "42c9342a052df15bbc3d170e2295227294c7db9d0bf2c16dd7d4d4ff2777ac46",
    "b7a2c011b6f89245a3cd8b57ddbb2165ed4bdeef46eee0821704b26df59e7499",
    "f56a10c38772b98cef1995e5a812ddbe84fd1570e6bc95acc0dd502486cbb5f7",
    "ef770d672232992fb3adbea52f5b0516fe005e90447433de9197cff22650ac87",
    "710f52cc6afbd96977120c7c72363fa5b56d8dcc1028bd34af94f2fedd50b528",
    "236d245b66420e38413a5916ebabeac69bb5c95e46104285c7fa7a9faa8f5d9b",
    "b4d7c6381c93c8e2fddfdee8f40d8d6ddb03067f756b86ca3bb30d4d7346976b",
    "df8da579f76859d7f67a55cbe0a24f8411f044d32fecdc69b9002515175795ea",
    "87b68ed2ee947f56c9ee6c4852b10cad913314d4827d4fa84575e30c43c37a96",
    "c387d400e5f6f556fc0f7d463362e60199d2b9be16176f00df65fdb0f88312b4",
    "bf11ba3f487c384138273c1715b1b4630260bda6d9074fc398bae619aaaf561d",
})
"""SHA-256 of lower-cased names of programs, their data files' and code
repositories' owners, firmware, code hosts and commercial document hosts."""

URL = re.compile(r"https?://|www\.|\bdoi\.org/", re.IGNORECASE)
FILE_NAME = re.compile(r"\b[\w-]+\.(?:dat|py|h|r|ipynb|f90|js|ts|jl|xml|csv|zip)\b", re.IGNORECASE)


def forbidden_names(text: str) -> list[str]:
    """Words of ``text`` whose lower-cased SHA-256 is in :data:`FORBIDDEN_DIGESTS`."""
    return [w for w in re.findall(r"[a-z0-9]+", text.lower()) if hashlib.sha256(w.encode()).hexdigest() in FORBIDDEN_DIGESTS]


def problems(text: str) -> list[str]:
    """Everything in ``text`` that is not a literature citation: named software, URLs, file names."""
    found = [f"name #{hashlib.sha256(w.encode()).hexdigest()[:8]}" for w in forbidden_names(text)]
    found += [f"URL {m.group(0)!r}" for m in URL.finditer(text)]
    found += [f"file name {m.group(0)!r}" for m in FILE_NAME.finditer(text)]
    return found


def table_texts() -> list[tuple[str, str]]:
    """(where, text) for every key, citation, note and check of the table."""
    out = []
    for key, src in TABLE.sources.items():
        out += [(f"source {key}: key", key), (f"source {key}: citation", src.citation), (f"source {key}: checked", src.checked)]
        if src.doi:
            out.append((f"source {key}: doi", src.doi))
    for sid, s in TABLE.substances.items():
        out += [(f"substance {sid}: name", s.name), (f"substance {sid}: note", s.note)]
        for i, st in enumerate(s.steps, 1):
            for q, v in (("pka", st.pka), ("enthalpy", st.enthalpy), ("heat_capacity", st.heat_capacity)):
                if v is not None:
                    out.append((f"substance {sid} step {i}: {q}_source", v.source))
        out += [(f"substance {sid} form {f.compound}: solubility_source", f.solubility.source) for f in s.forms if f.solubility]
    return out


def test_the_checker_catches_what_it_must() -> None:
    # A URL and a data- or code-file name are caught; a plain citation is not.
    assert problems("see https://example.invalid/x") and problems("values from thermo.dat")
    assert problems("equation in the module water_density.py")
    assert not problems("R. N. Goldberg, N. Kishore and R. M. Lennen, J. Phys. Chem. Ref. Data 31, 231–370 (2002)")
    assert hashlib.sha256(b"zzqq").hexdigest() not in FORBIDDEN_DIGESTS
    assert len(FORBIDDEN_DIGESTS) >= 40 and all(re.fullmatch(r"[0-9a-f]{64}", d) for d in FORBIDDEN_DIGESTS)


@pytest.mark.parametrize(("where", "text"), table_texts(), ids=lambda x: x if len(x) < 60 else None)
def test_no_table_text_names_software_a_url_or_a_file(where: str, text: str) -> None:
    assert not problems(text), (where, problems(text))


def test_every_source_used_is_literature() -> None:
    used = {v.source for s in TABLE.substances.values() for st in s.steps for v in (st.pka, st.enthalpy, st.heat_capacity) if v}
    used |= {f.solubility.source for s in TABLE.substances.values() for f in s.forms if f.solubility}
    assert used <= set(TABLE.sources), used - set(TABLE.sources)
    assert set(TABLE.sources) <= used, f"unused sources: {set(TABLE.sources) - used}"
    for key in used:
        assert TABLE.sources[key].kind in TABLE_SOURCE_KINDS, (key, TABLE.sources[key].kind)
        # keys are named after the literature: authors and year, or the compilation
        assert re.fullmatch(r"[a-z]+(?:-[a-z]+)*-(?:19|20)\d\d|nist46|crc-handbook(?:-[a-z]+)*", key), key


def test_every_status_has_a_meaning_and_every_note_says_how_its_values_were_checked() -> None:
    assert tuple(STATUS_MEANINGS) == STATUSES
    words = {"confirmed": "confirmed", "derived": "converted", "computed": "computed", "unverified": "unverified", "recalled": "recalled"}
    for sid, s in TABLE.substances.items():
        statuses = {v.status for st in s.steps for v in (st.pka, st.enthalpy, st.heat_capacity) if v}
        for status in statuses:
            assert words[status] in s.note, (sid, status, s.note)


def test_unchecked_sources_say_so() -> None:
    for key, src in TABLE.sources.items():
        statuses = {v.status for s in TABLE.substances.values() for st in s.steps for v in (st.pka, st.enthalpy, st.heat_capacity) if v and v.source == key}
        if statuses <= {"recalled"}:
            assert src.checked.startswith("not checked"), key
        if "unverified" in statuses:
            assert "unverified" in src.checked, key


def _repository_text_files() -> list[Path]:
    files = [p for p in ROOT.glob("*.md")] + [ROOT / "Makefile", ROOT / "pyproject.toml"]
    for folder in ("dossier", "docs", "templates", "tests", "methods", "tools"):
        files += [p for p in (ROOT / folder).rglob("*") if p.is_file() and p.suffix in {".py", ".md", ".yaml", ".yml", ".html", ".css", ".csv", ".txt", ".toml", ".svg"}]
    return sorted(p for p in files if p.exists())


def test_no_file_of_the_repository_names_software_as_a_source() -> None:
    offenders = [f"{p.relative_to(ROOT)}:{n}" for p in _repository_text_files()
                 for n, line in enumerate(p.read_text(encoding="utf-8", errors="replace").splitlines(), 1) if forbidden_names(line)]
    assert not offenders, offenders
