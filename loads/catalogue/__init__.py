"""The built-in catalogue: invented, generic archetypes of lamps and dimmers.

Every archetype is invented and labelled so in its file; the figures are typical
values of the trade or derivations, each named beside the value in the TOML file.  No
maker's data is used.  The files are ordinary profile files (``schema = 1`` and one
``[dimmer]`` or one or more ``[[loads]]`` tables), so a user can copy one and edit it.
``demo.toml`` is the built-in demo circuit (``dimfit demo`` writes it).
"""
from __future__ import annotations

import functools
from dataclasses import dataclass
from importlib import resources

from loads.circuit import Circuit
from loads.dimmer import Dimmer
from loads.files import parse_circuit, parse_profile
from loads.load import LoadGroup

DEMO_FILE = "demo.toml"


@dataclass(frozen=True, slots=True)
class Archetype:
    """name: unique, generic; kind: "lamp" or "dimmer"; object: the Dimmer or
    LoadGroup (count 1 for lamps); file: the catalogue file it comes from."""

    name: str
    kind: str
    object: Dimmer | LoadGroup
    file: str


def _files() -> list:
    folder = resources.files(__name__)
    return sorted((f for f in folder.iterdir() if f.name.endswith(".toml") and f.name != DEMO_FILE),
                  key=lambda f: f.name)


@functools.lru_cache(maxsize=1)
def _load() -> tuple[Archetype, ...]:
    out: list[Archetype] = []
    seen: set[str] = set()
    for f in _files():
        obj, _ranges = parse_profile(f.read_text(encoding="utf-8"), source=f"catalogue/{f.name}")
        items = [("dimmer", obj)] if isinstance(obj, Dimmer) else [("lamp", g) for g in obj]
        for kind, item in items:
            if item.name in seen:
                raise RuntimeError(f"catalogue/{f.name}: duplicate archetype name {item.name!r}")
            seen.add(item.name)
            out.append(Archetype(item.name, kind, item, f.name))
    return tuple(out)


def list_archetypes() -> list[Archetype]:
    """Every built-in archetype: dimmers first, then lamps, each in file order."""
    items = _load()
    return [a for a in items if a.kind == "dimmer"] + [a for a in items if a.kind == "lamp"]


def get(name: str) -> Archetype:
    """The archetype called ``name`` (KeyError if there is none)."""
    for a in _load():
        if a.name == name:
            return a
    raise KeyError(f"no built-in archetype named {name!r}")


def demo_text() -> str:
    """The text of the demo circuit file, with its comments."""
    return resources.files(__name__).joinpath(DEMO_FILE).read_text(encoding="utf-8")


def demo_circuit() -> Circuit:
    """The built-in demo circuit (an invented scenario)."""
    return parse_circuit(demo_text(), source=f"catalogue/{DEMO_FILE}")
