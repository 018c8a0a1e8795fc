"""ph-dossier: exact acid–base equilibrium, validity ranges of the pH shortcuts
written into analytical procedures, and audit-ready dossiers.

Import name ``dossier``; command ``dossier`` (or ``python -m dossier``).
"""

__version__ = "0.1.0"
