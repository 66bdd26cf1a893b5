"""Reporters: each turns a ``Report`` into one output format. Adding a format means
adding a module here and a line in ``FORMATS``."""

from . import json_report, sarif, text

FORMATS = {
    "text": text.render,
    "json": json_report.render,
    "sarif": sarif.render,
}
