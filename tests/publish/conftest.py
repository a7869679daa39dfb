"""Fixtures for the site tests: the synthetic compiled plan and stand-ins for modules not landed yet."""

from __future__ import annotations

import importlib.machinery
import sys
import types
from dataclasses import dataclass, field
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from synthetic import synthetic_data  # noqa: E402

REPO = Path(__file__).resolve().parents[2]


@pytest.fixture
def data():
    return synthetic_data()


@dataclass(frozen=True)
class FakeCompiled:
    data: dict
    diagnostics: list = field(default_factory=list)


def _module(name: str, **attrs) -> types.ModuleType:
    mod = types.ModuleType(name)
    mod.__spec__ = importlib.machinery.ModuleSpec(name, None)
    for k, v in attrs.items():
        setattr(mod, k, v)
    return mod


@pytest.fixture
def fake_compile(monkeypatch):
    """planpack.compile replaced by one that returns the synthetic data under the plan's net id."""
    warnings: list = []

    def compile_plan(plan):
        d = synthetic_data(plan.net.id, title=plan.net.title, valid_from=plan.net.valid_from.isoformat(),
                           valid_to=plan.net.valid_to.isoformat())
        return FakeCompiled(d, list(warnings))

    monkeypatch.setitem(sys.modules, "planpack.compile", _module("planpack.compile", compile_plan=compile_plan))
    monkeypatch.setattr("planpack.workflow.cache.cached_compile", lambda plan, **kw: compile_plan(plan))
    return warnings


@pytest.fixture
def fake_cards(monkeypatch):
    def render_cards(data):
        return {f"{data['net']['id']}-cards.pdf": b"%PDF-1.4 stand-in\n", "net-card.pdf": b"%PDF-1.4 net\n"}

    monkeypatch.setitem(sys.modules, "planpack.publish.cards", _module("planpack.publish.cards", render_cards=render_cards))


@pytest.fixture
def no_cards(monkeypatch):
    """A card renderer that makes no cards, so site tests stay fast and card-free."""
    monkeypatch.setitem(sys.modules, "planpack.publish.cards",
                        _module("planpack.publish.cards", render_cards=lambda data: {}))
