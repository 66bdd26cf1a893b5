"""``[tool.dimcheck]`` configuration: where it is found, what it may say, and its validation.

Every unknown key or bad value is a ``ConfigError`` with a one-line message naming the
key and the file; the command line turns it into exit code 2.
"""

from __future__ import annotations

import re
import sys
from pathlib import Path



def _toml():
    """The TOML reader, imported only when there is a file to read."""
    if sys.version_info >= (3, 11):
        import tomllib
    else:  # pragma: no cover - the package requires 3.11, kept for older tooling
        import tomli as tomllib
    return tomllib

from ..rules.registry import matching_codes


class ConfigError(Exception):
    """A configuration problem, one line, naming the file and the key."""


class Config:
    """The settings of a run: the defaults, or what a ``[tool.dimcheck]`` table gives.
    (A plain class: see the note on records in rules/registry.py.)"""

    def __init__(self, source: Path | None = None, paths: list[str] | None = None,
                 exclude: list[str] | None = None, select: list[str] | None = None,
                 ignore: list[str] | None = None, fail_on: str = "error", units: list[Path] | None = None,
                 stubs: list[Path] | None = None, base_dimensions: list[str] | None = None,
                 docstring_units: bool = True, suffix_units: bool = False,
                 name_units: dict[str, str] | None = None):
        self.source = source  # the file the settings came from, None for defaults
        self.paths: list[str] = paths or []
        self.exclude: list[str] = exclude or []
        self.select: list[str] = select or []  # codes; empty means all
        self.ignore: list[str] = ignore or []
        self.fail_on = fail_on
        self.units: list[Path] = units or []
        self.stubs: list[Path] = stubs or []
        self.base_dimensions: list[str] = base_dimensions or []
        self.docstring_units = docstring_units
        self.suffix_units = suffix_units
        self.name_units: dict[str, str] = name_units or {}

    def replace(self, **changes) -> "Config":
        """A copy with some settings changed."""
        return Config(**{**vars(self), **changes})

    def __repr__(self) -> str:
        return "Config(" + ", ".join(f"{name}={value!r}" for name, value in vars(self).items()) + ")"

    @property
    def base_dir(self) -> Path:
        return self.source.parent if self.source else Path.cwd()

    @property
    def exclude_base(self) -> str | None:
        """The folder ``exclude`` patterns are also matched relative to (the config's)."""
        return str(self.base_dir) if self.source is not None else None


_LIST_OF_STRINGS = ("paths", "exclude", "select", "ignore", "units", "stubs", "base-dimensions")
_KNOWN_KEYS = set(_LIST_OF_STRINGS) | {"fail-on", "docstring-units", "suffix-units", "name-units"}
_IDENTIFIER = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$")


def find_config(start: Path) -> tuple[Path, dict] | None:
    """The nearest pyproject.toml with a ``[tool.dimcheck]`` table, from ``start`` upwards,
    and its parsed contents (so that it is read once)."""
    for folder in [start, *start.parents]:
        candidate = folder / "pyproject.toml"
        if candidate.is_file():
            try:
                text = candidate.read_text(encoding="utf-8")
            except (OSError, UnicodeDecodeError) as error:
                raise ConfigError(f"{candidate}: cannot read: {error}") from None
            if "dimcheck" not in text:
                continue  # no [tool.dimcheck] table can be in it: no need to parse it
            tomllib = _toml()
            try:
                data = tomllib.loads(text)
            except tomllib.TOMLDecodeError as error:
                raise ConfigError(f"{candidate}: invalid TOML: {error}") from None
            if isinstance(data.get("tool"), dict) and "dimcheck" in data["tool"]:
                return candidate, data
    return None


def load_config(explicit: str | None = None, start: Path | None = None) -> Config:
    if explicit is None:
        found = find_config(start or Path.cwd())
        if found is None:
            return Config()
        path, data = found
    else:
        path = Path(explicit)
        if not path.is_file():
            raise ConfigError(f"{explicit}: configuration file not found")
        tomllib = _toml()
        try:
            data = tomllib.loads(path.read_text(encoding="utf-8"))
        except UnicodeDecodeError:
            raise ConfigError(f"{path}: not valid UTF-8") from None
        except OSError as error:
            raise ConfigError(f"{path}: cannot read: {error.strerror or error}") from None
        except tomllib.TOMLDecodeError as error:
            raise ConfigError(f"{path}: invalid TOML: {error}") from None
    tool = data.get("tool")
    if isinstance(tool, dict) and "dimcheck" in tool:
        table = tool["dimcheck"]
    elif path.name == "pyproject.toml":
        table = {}
    else:
        table = data  # a standalone file holds the keys at its top level
    if not isinstance(table, dict):
        raise ConfigError(f"{path}: [tool.dimcheck] must be a table")
    return validate(table, path, "the file's top level" if table is data else "[tool.dimcheck]")


def _where(path: Path, key: str) -> str:
    return f"{path}: [tool.dimcheck] {key}"


def parse_codes(values: list[str], where: str) -> list[str]:
    if not values:
        raise ConfigError(f"{where}: no rule code given")
    codes: list[str] = []
    for value in values:
        found = matching_codes(value)
        if not value.strip() or not found:
            raise ConfigError(f"{where}: unknown rule code {value!r}")
        codes.extend(code for code in found if code not in codes)
    return codes


def validate(table: dict, path: Path, where_keys: str = "[tool.dimcheck]") -> Config:
    """The settings of ``table`` (found in ``path``, at ``where_keys``), checked."""
    config = Config(source=path)
    base = path.parent
    for key, value in table.items():
        if key not in _KNOWN_KEYS:
            known = ", ".join(sorted(_KNOWN_KEYS))
            raise ConfigError(f"{path}: unknown key {key!r} in {where_keys} (known keys: {known})")
        where = _where(path, key)
        if key in _LIST_OF_STRINGS:
            if isinstance(value, str):
                value = [value]
            if not isinstance(value, list) or not all(isinstance(item, str) for item in value):
                raise ConfigError(f"{where}: expected a list of strings, got {value!r}")
        if key == "paths":
            config.paths = [str(base / item) for item in value]
        elif key == "exclude":
            config.exclude = list(value)
        elif key in ("select", "ignore"):
            setattr(config, key, parse_codes(value, where))
        elif key == "fail-on":
            if value not in ("error", "warning"):
                raise ConfigError(f"{where}: expected \"error\" or \"warning\", got {value!r}")
            config.fail_on = value
        elif key in ("units", "stubs"):
            resolved = []
            for item in value:
                item_path = base / item
                exists = item_path.is_file() if key == "units" else item_path.is_dir()
                if not exists:
                    kind = "file" if key == "units" else "folder"
                    raise ConfigError(f"{where}: {kind} not found: {item}")
                resolved.append(item_path)
            setattr(config, key, resolved)
        elif key == "base-dimensions":
            for item in value:
                if not _IDENTIFIER.match(item.strip("[]")):
                    raise ConfigError(f"{where}: not a dimension name: {item!r}")
            config.base_dimensions = [item.strip("[]") for item in value]
        elif key in ("docstring-units", "suffix-units"):
            if not isinstance(value, bool):
                raise ConfigError(f"{where}: expected true or false, got {value!r}")
            setattr(config, key.replace("-", "_"), value)
        elif key == "name-units":
            if not isinstance(value, dict) or not all(
                    isinstance(k, str) and isinstance(v, str) for k, v in value.items()):
                raise ConfigError(f"{where}: expected a table of pattern = \"unit\" strings")
            config.name_units = dict(value)
    return config
