"""Declarations: where source code states units (annotations, comments, stubs)."""
