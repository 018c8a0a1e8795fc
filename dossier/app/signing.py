"""``dossier keygen`` and ``dossier sign``: personal keys, detached signatures."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from ..audit.signatures import MEANINGS, SignatureError, Statement, load_key, make_key, sign_dossier
from ..audit.verify import check_integrity
from .errors import UserError

__all__ = ["KeyMade", "Signed", "keygen", "sign", "MEANINGS", "SignatureError"]


@dataclass(frozen=True)
class KeyMade:
    """A new key pair: where each half is, and the key's id."""

    private: Path
    public: Path
    key_id: str


@dataclass(frozen=True)
class Signed:
    """A signature recorded: its file and what it signs."""

    file: Path
    statement: Statement


def keygen(path: str | Path, name: str) -> KeyMade:
    """Make a personal Ed25519 key pair for ``name`` (private key mode 0600, never in a dossier).

    The folder must exist: a private key goes only where its owner chose, so a
    missing folder (a typing error, or one that would be made with the default
    permissions) is refused rather than made.

    Raises
    ------
    SignatureError
        When the key cannot be made there (the message says why).
    """
    folder = Path(path).parent
    if folder.exists() and not folder.is_dir():
        raise SignatureError(f"{folder} is not a folder")
    if not folder.exists():
        raise SignatureError(f"{folder}: no such folder; keygen does not create folders, make it first "
                             f"(readable by you only: mkdir -m 700 {folder})")
    return KeyMade(*make_key(path, name))


def sign(dossier: str | Path, key: str | Path, meaning: str) -> Signed:
    """Sign a built dossier: its files are checked first (hashes, fingerprint on every
    page); a dossier that does not match its manifest is not signed.

    Raises
    ------
    UserError
        Not a dossier, a dossier that does not match its manifest, a bad key or meaning.
    """
    if meaning not in MEANINGS:
        raise SignatureError(f"--meaning must be one of {', '.join(MEANINGS)}; got {meaning!r}")
    k = load_key(key)
    manifest, mismatches = check_integrity(Path(dossier))
    if mismatches:
        shown = "; ".join(str(m) for m in mismatches[:3]) + (f"; and {len(mismatches) - 3} more" if len(mismatches) > 3 else "")
        raise UserError(f"{dossier} does not match its manifest, so it is not signed: {shown} (run: dossier verify {dossier})")
    file = sign_dossier(Path(dossier), manifest, k, meaning)
    from ..audit.signatures import check_signatures, manifest_sha256

    checked = next(c for c in check_signatures(Path(dossier), manifest.fingerprint(), manifest_sha256(Path(dossier))) if file.name in c.file)
    if not checked.applies or checked.statement is None:  # pragma: no cover - a signature just made
        raise RuntimeError(f"the signature just written does not check: {checked.problem}")
    return Signed(file, checked.statement)
