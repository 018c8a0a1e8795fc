"""Audit and orchestration beside the pipeline: re-verify a built dossier
(:mod:`.verify`), compare two (:mod:`.diff`), and the content-hash cache of
method outcomes (:mod:`.cache`). Reads what publish wrote; may use the
analysis to re-compute."""
