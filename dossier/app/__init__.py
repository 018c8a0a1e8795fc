"""The application layer: one function per thing a user asks for.

The command line parses its arguments, calls one of these, and prints what
it returns; nothing else of the package is imported by it. Each function
runs the stages in their one order (load → solve → analyse → render →
publish) or an audit beside them, and raises :class:`UserError` (or a
subclass) with a message in the user's terms when a request cannot be done.
"""

from ..audit.diff import DossierDiff, NotADossier, diff_dossiers
from ..audit.verify import VerifyReport
from .verifying import verify
from ..analysis.method import AnalysisSettings
from .build_dossier import BuildOptions, BuildOutcome, PreviousDossierError, analyse, build
from .errors import OptionError, UsageError, UserError
from .jobs import Reporter, Silent
from .methods import CheckOutcome, check, check_method_id, schema_document, starter, substance_table, write_starter
from .serve import preview_server
from .signing import KeyMade, Signed, keygen, sign
from .solve import InlineSolution, MethodPoints, solve_file, solve_inline

__all__ = [
    "AnalysisSettings",
    "BuildOptions",
    "BuildOutcome",
    "CheckOutcome",
    "DossierDiff",
    "InlineSolution",
    "KeyMade",
    "Signed",
    "keygen",
    "sign",
    "MethodPoints",
    "NotADossier",
    "OptionError",
    "PreviousDossierError",
    "Reporter",
    "Silent",
    "UsageError",
    "UserError",
    "VerifyReport",
    "analyse",
    "build",
    "check",
    "check_method_id",
    "diff_dossiers",
    "preview_server",
    "schema_document",
    "solve_file",
    "solve_inline",
    "starter",
    "substance_table",
    "verify",
    "write_starter",
]
