"""Publish: the one writer, the staging folder and the swap into place."""
