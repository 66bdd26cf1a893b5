"""Rules: the registry of codes, the finding record and the checks the inference pass calls."""

from .finding import Finding
from .registry import ERROR, RULES, WARNING, Rule

__all__ = ["ERROR", "RULES", "WARNING", "Finding", "Rule"]
