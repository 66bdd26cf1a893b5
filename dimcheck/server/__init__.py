"""``dimcheck serve``: the checker as a Language Server Protocol server for editors.

The editor-independent part (checking documents that live in memory, hover text, the
suppression edit) is plain Python in ``session``, ``overlay``, ``hover``, ``actions`` and
``positions``; only ``lsp`` imports pygls, so the rest can be used and tested without it.
"""
