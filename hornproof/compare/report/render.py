"""Rendering a report page from its Jinja2 template and writing it atomically.

Templates live in ``hornproof/compare/report/templates/`` (package data) and receive plain
data only (strings, numbers, lists, dicts) prepared by ``verify_page`` / ``sweep_page``.
Autoescape is on for every template: text from the JSON (titles, warnings, case names) can
never become markup.
"""

from pathlib import Path

from ...atomic import write_text_atomic

TEMPLATE_FOLDER = Path(__file__).with_name("templates")


def environment():
    """The Jinja2 environment of the report templates (autoescape on, undefined names fail)."""
    import jinja2  # lazy: only report building needs it, and it is slow to import

    return jinja2.Environment(loader=jinja2.FileSystemLoader(str(TEMPLATE_FOLDER)), autoescape=True,
                              undefined=jinja2.StrictUndefined, trim_blocks=True, lstrip_blocks=True,
                              keep_trailing_newline=True)


def render_page(template_name, context):
    """The text of ``template_name`` rendered with ``context`` (a dict of plain data)."""
    return environment().get_template(template_name).render(**context)


def write_page(path, text):
    """Write ``text`` to ``path`` atomically; returns ``str(path)``."""
    write_text_atomic(path, text)
    return str(path)
