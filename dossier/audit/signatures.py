"""Personal keys and detached signatures over a dossier's fingerprint.

A key pair is Ed25519 (RFC 8032) from the ``cryptography`` library. The
private key file is written readable by its owner only and never into a
dossier; the public key goes beside it (``FILE.pub``) for the laboratory's
register of keys.

A signature is a small JSON file in the folder beside the dossier
(``NAME.signatures/`` next to the dossier folder ``NAME``, see
:meth:`dossier.layout.Layout.signatures_folder`), so signing changes no byte
of the dossier. It signs a *statement*: the dossier's fingerprint, the
SHA-256 of its whole ``manifest.json`` (which also hashes the pages and
PDFs), the signer's name, the meaning (``prepared``, ``reviewed``,
``approved``), the time, and the public key. Formats: docs/manifest-format.md.
"""

from __future__ import annotations

import base64
import hashlib
import json
import stat
from dataclasses import dataclass
from datetime import datetime, timezone
from pathlib import Path
from typing import Any

from ..layout import LAYOUT
from ..problems import UserError
from ..publish.manifest import Manifest
from ..publish.writer import move_one_file, write_one_file

__all__ = [
    "MEANINGS", "KEY_FORMAT", "PUBLIC_KEY_FORMAT", "SIGNATURE_FORMAT", "SignatureError", "Statement", "SignatureCheck",
    "make_key", "load_key", "sign_dossier", "check_signatures", "signatures_folder", "public_key_path",
    "EARLIER", "retire_signatures", "earlier_signatures",
]

EARLIER = "earlier"
"""Sub-folder of the signatures folder where a rebuild moves the signatures of the
build it replaced (``NAME.signatures/earlier/FINGERPRINT/``)."""

MEANINGS = ("prepared", "reviewed", "approved")
"""What a signature says the signer did with the dossier."""

KEY_FORMAT = "ph-dossier-private-key/1"
PUBLIC_KEY_FORMAT = "ph-dossier-public-key/1"
SIGNATURE_FORMAT = "ph-dossier-signature/1"


class SignatureError(UserError):
    """A key that cannot be made, read or used (the message says why)."""


def _b64(data: bytes) -> str:
    return base64.b64encode(data).decode("ascii")


def _unb64(text: Any, what: str) -> bytes:
    try:
        return base64.b64decode(str(text), validate=True)
    except ValueError:
        raise SignatureError(f"{what} is not base64") from None


def key_id(public: bytes) -> str:
    """A short name of a public key: the first 16 hex digits of its SHA-256."""
    return hashlib.sha256(public).hexdigest()[:16]


def public_key_path(path: Path) -> Path:
    """Where the public key of the private key file ``path`` is written: ``path`` + ``.pub``."""
    return path.with_name(path.name + ".pub")


def _inside_a_dossier(path: Path) -> Path | None:
    for folder in path.resolve().parents:
        if (folder / LAYOUT.manifest).is_file():
            return folder
    return None


def make_key(path: str | Path, name: str) -> tuple[Path, Path, str]:
    """A new Ed25519 key pair for ``name``: the private key in ``path`` (mode 0600),
    the public key in ``path.pub``.

    Returns
    -------
    (private path, public path, key id)

    Raises
    ------
    SignatureError
        Empty name, a file that exists, a path inside a dossier, or a folder that cannot be written.
    """
    from cryptography.hazmat.primitives import serialization
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

    p, name = Path(path), name.strip()
    if not name:
        raise SignatureError("--name must name the key's owner (a person's name)")
    if (dossier := _inside_a_dossier(p)) is not None:
        raise SignatureError(f"{p}: a private key is never written into a dossier ({dossier} is one); choose a path outside it")
    pub = public_key_path(p)
    for target in (p, pub):
        if target.exists():
            raise SignatureError(f"{target} exists; a key is never overwritten (choose another file)")
    private = Ed25519PrivateKey.generate()
    raw_private = private.private_bytes(serialization.Encoding.Raw, serialization.PrivateFormat.Raw, serialization.NoEncryption())
    raw_public = private.public_key().public_bytes(serialization.Encoding.Raw, serialization.PublicFormat.Raw)
    kid = key_id(raw_public)
    doc = {"format": KEY_FORMAT, "name": name, "key_id": kid, "public_key": _b64(raw_public), "private_key": _b64(raw_private)}
    public_doc = {"format": PUBLIC_KEY_FORMAT, "name": name, "key_id": kid, "public_key": _b64(raw_public)}
    try:
        write_one_file(p, _json(doc), mode=0o600)
        write_one_file(pub, _json(public_doc), mode=0o644)
    except OSError as exc:
        raise SignatureError(f"cannot write the key to {exc.filename or p}: {exc.strerror or exc}") from None
    return p, pub, kid


@dataclass(frozen=True)
class Key:
    """A private key read from its file, with its owner's name."""

    name: str
    key_id: str
    public: bytes
    private: bytes


def load_key(path: str | Path) -> Key:
    """Read a private key file made by :func:`make_key`.

    Raises
    ------
    SignatureError
        Missing, unreadable, readable by others than its owner, or not a key of this format.
    """
    p = Path(path)
    try:
        mode = p.stat().st_mode
        doc = json.loads(p.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise SignatureError(f"{p}: no such key file (make one with: dossier keygen {p} --name \"Your Name\")") from None
    except ValueError:
        raise SignatureError(f"{p}: not a private key made by dossier keygen (not a key file at all)") from None
    except OSError as exc:
        raise SignatureError(f"{p}: cannot read the key: {exc.strerror or exc}") from None
    if isinstance(doc, dict) and doc.get("format") == PUBLIC_KEY_FORMAT:
        raise SignatureError(f"{p}: this is the public key; sign with the private key file beside it ({p.with_suffix('') if p.suffix == '.pub' else p})")
    if mode & (stat.S_IRWXG | stat.S_IRWXO):
        raise SignatureError(f"{p}: the private key is readable by others (mode {stat.S_IMODE(mode):o}); make it yours only: chmod 600 {p}")
    if not isinstance(doc, dict) or doc.get("format") != KEY_FORMAT:
        raise SignatureError(f"{p}: not a private key made by dossier keygen (format {KEY_FORMAT})")
    public, private = _unb64(doc.get("public_key"), f"{p}: public_key"), _unb64(doc.get("private_key"), f"{p}: private_key")
    if len(public) != 32 or len(private) != 32 or not str(doc.get("name", "")).strip():
        raise SignatureError(f"{p}: the key file is damaged (name, public_key or private_key)")
    from cryptography.hazmat.primitives import serialization
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

    derived = Ed25519PrivateKey.from_private_bytes(private).public_key().public_bytes(serialization.Encoding.Raw, serialization.PublicFormat.Raw)
    if derived != public:
        raise SignatureError(f"{p}: the key file is damaged (its public key is not the private key's)")
    return Key(str(doc["name"]).strip(), key_id(public), public, private)


@dataclass(frozen=True)
class Statement:
    """What a signature signs (every field is signed)."""

    dossier: str
    fingerprint: str
    manifest_sha256: str
    signer: str
    meaning: str
    signed_at: str
    key_id: str
    public_key: str

    def to_bytes(self) -> bytes:
        """The signed bytes: canonical JSON (keys sorted, no spaces, UTF-8)."""
        return json.dumps(self.__dict__, sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode("utf-8")


def signatures_folder(dossier: Path) -> Path:
    """The folder beside a dossier that holds its signatures."""
    d = Path(dossier).resolve()
    return d.parent / LAYOUT.signatures_folder(d.name)


def _json(doc: dict[str, Any]) -> bytes:
    return (json.dumps(doc, indent=2, ensure_ascii=False) + "\n").encode("utf-8")


def manifest_sha256(dossier: Path) -> str:
    return hashlib.sha256((Path(dossier) / LAYOUT.manifest).read_bytes()).hexdigest()


def sign_dossier(dossier: Path, manifest: Manifest, key: Key, meaning: str, *, now: datetime | None = None) -> Path:
    """Record a detached signature of ``dossier`` (already checked) beside it; returns its file.

    Raises
    ------
    SignatureError
        An unknown meaning, or a signature file that cannot be written.
    """
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

    if meaning not in MEANINGS:
        raise SignatureError(f"--meaning must be one of {', '.join(MEANINGS)}; got {meaning!r}")
    moment = (now or datetime.now(tz=timezone.utc)).astimezone(timezone.utc)
    st = Statement(Path(dossier).resolve().name, manifest.fingerprint(), manifest_sha256(dossier), key.name, meaning,
                   moment.strftime("%Y-%m-%dT%H:%M:%SZ"), key.key_id, _b64(key.public))
    signature = Ed25519PrivateKey.from_private_bytes(key.private).sign(st.to_bytes())
    target = signatures_folder(dossier) / f"{moment.strftime('%Y%m%dT%H%M%SZ')}-{meaning}-{key.key_id}.json"
    try:
        return write_one_file(target, _json({"format": SIGNATURE_FORMAT, "statement": st.__dict__, "signature": _b64(signature)}), mode=0o644)
    except FileExistsError:
        raise SignatureError(f"{target} exists: this key signed this meaning in this second already") from None
    except OSError as exc:
        raise SignatureError(f"cannot write the signature {target}: {exc.strerror or exc}") from None


@dataclass(frozen=True)
class SignatureCheck:
    """One signature file beside a dossier, checked.

    Attributes
    ----------
    file : str
        Its path, relative to the dossier's parent folder.
    statement : Statement or None
        What it signs (None when it cannot be read).
    valid : bool
        The signature is the statement's, made by the public key it names.
    applies : bool
        Valid, and the statement's fingerprint and manifest hash are this dossier's.
    problem : str
        Why it does not apply ("" when it does).
    """

    file: str
    statement: Statement | None
    valid: bool
    applies: bool
    problem: str


def check_signatures(dossier: Path, fingerprint: str | None, manifest_hash: str | None) -> tuple[SignatureCheck, ...]:
    """Every signature beside ``dossier``, checked against the given fingerprint and
    manifest hash (None for both: only the signatures' own validity is checked)."""
    folder = signatures_folder(dossier)
    if not folder.is_dir():
        return ()
    return tuple(_check_one(f, folder.parent, fingerprint, manifest_hash) for f in sorted(folder.glob("*.json")))


def retire_signatures(dossier: Path, fingerprint: str) -> tuple[Path, ...]:
    """Move the signatures of earlier builds out of the way of a new build.

    Every readable signature beside ``dossier`` whose signed fingerprint is
    not ``fingerprint`` (the build just published) moves to
    ``NAME.signatures/earlier/SIGNED-FINGERPRINT/``: it signed the build this
    one replaced, and the new build's provenance page and signature page list
    it as such. A signature that cannot be read or does not check stays where
    it is, so that ``verify`` keeps reporting it.

    Returns
    -------
    tuple of Path
        Where the moved signatures are now.
    """
    moved = []
    for c in check_signatures(dossier, None, None):
        if c.statement is None or not c.valid or c.statement.fingerprint == fingerprint:
            continue
        source = signatures_folder(dossier).parent / c.file
        moved.append(move_one_file(source, signatures_folder(dossier) / EARLIER / c.statement.fingerprint / source.name))
    return tuple(moved)


def earlier_signatures(dossier: Path) -> tuple[Path, ...]:
    """The signatures a rebuild moved aside (:func:`retire_signatures`)."""
    folder = signatures_folder(dossier) / EARLIER
    return tuple(sorted(folder.glob("*/*.json"))) if folder.is_dir() else ()


def _check_one(path: Path, base: Path, fingerprint: str | None, manifest_hash: str | None) -> SignatureCheck:
    from cryptography.exceptions import InvalidSignature
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PublicKey

    rel = path.relative_to(base).as_posix()
    try:
        doc = json.loads(path.read_text(encoding="utf-8"))
        if doc.get("format") != SIGNATURE_FORMAT:
            raise ValueError(f"not a signature of format {SIGNATURE_FORMAT}")
        st = Statement(**{k: str(v) for k, v in doc["statement"].items()})
        public, signature = _unb64(st.public_key, "public_key"), _unb64(doc["signature"], "signature")
    except (OSError, ValueError, KeyError, TypeError, AttributeError, UserError) as exc:
        return SignatureCheck(rel, None, False, False, f"cannot be read: {exc}")
    try:
        if key_id(public) != st.key_id:
            raise InvalidSignature
        Ed25519PublicKey.from_public_bytes(public).verify(signature, st.to_bytes())
    except (InvalidSignature, ValueError):
        return SignatureCheck(rel, st, False, False, "the signature does not match its statement (altered or forged)")
    if fingerprint is None:
        return SignatureCheck(rel, st, True, False, "")
    if st.fingerprint != fingerprint:
        return SignatureCheck(rel, st, True, False, f"signed fingerprint {st.fingerprint}, not this dossier's {fingerprint}: the dossier changed since it was signed")
    if st.manifest_sha256 != manifest_hash:
        return SignatureCheck(rel, st, True, False, "signed another manifest.json (same fingerprint, other pages or PDFs): the dossier changed since it was signed")
    return SignatureCheck(rel, st, True, True, "")
