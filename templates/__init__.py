"""Jinja2 templates and stylesheets of the site and the PDF (installed as the
package ``dossier.templates`` so that the build finds them)."""
