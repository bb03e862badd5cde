"""``@frozen_dataclass`` gives exactly what ``@dataclasses.dataclass(frozen=True)`` gives.

Reference: the standard library's :func:`dataclasses.dataclass` (Python documentation,
"dataclasses -- Data Classes"), run on the same class bodies.  Two kinds of check:

- every dataclass of the package, defined once with the standard decorator and once with
  ``frozen_dataclass`` (its kept code compiled afresh, then read back from the file), in separate
  processes over the same module sources: the generated methods' code objects, closures, defaults,
  names and the fields, ``__match_args__``, docstrings and parameters are equal;
- behaviour on sample class bodies against the standard decorator: eq, hash, repr, fields,
  ``replace``, ``asdict``, pickling, ``__match_args__``, ``default_factory``, the frozen
  assignment and deletion errors (type and message), ``eq=False``.
"""

from __future__ import annotations

import dataclasses
import json
import os
import pickle
import subprocess
import sys
import threading
from pathlib import Path

import pytest

from enumerator.frozen import CodeStore, frozen_dataclass

ROOT = Path(__file__).resolve().parent.parent

# A child process: define every dataclass of the package with the decorator chosen by argv[1]
# ("plain": the standard library's; "kept": frozen_dataclass with the store file argv[2]) and
# print a description of each, with nothing in it that differs between processes by chance.
_DESCRIBE = r"""
import dataclasses, importlib, json, marshal, pkgutil, re, sys, types
from pathlib import Path
import enumerator.frozen as kept
mode = sys.argv[1]
if mode == "plain":
    kept._decorate = lambda cls, eq, store: dataclasses.dataclass(frozen=True, eq=eq)(cls)
else:
    kept.STORE.path = Path(sys.argv[2])
import enumerator

def text(v):
    if isinstance(v, type):
        return f"type {v.__module__}.{v.__qualname__}"
    return re.sub(r" at 0x[0-9a-f]+", "", repr(v))

def function(fn):
    out = {"name": fn.__name__, "qualname": fn.__qualname__, "module": fn.__module__,
           "defaults": text(fn.__defaults__), "kwdefaults": text(fn.__kwdefaults__),
           "annotations": text(fn.__annotations__), "doc": fn.__doc__,
           "code": marshal.dumps(fn.__code__).hex(), "firstlineno": fn.__code__.co_firstlineno,
           "cells": [text(c.cell_contents) if not isinstance(c.cell_contents, types.FunctionType)
                     else function(c.cell_contents) for c in fn.__closure__ or ()]}
    if hasattr(fn, "__wrapped__"):
        out["wrapped"] = function(fn.__wrapped__)
    return out

seen = {}
for info in pkgutil.walk_packages(enumerator.__path__, "enumerator."):
    if info.name in ("enumerator.__main__", "enumerator.frozen"):
        continue
    try:
        module = importlib.import_module(info.name)
    except ImportError:
        continue
    for name, cls in sorted(vars(module).items()):
        if not (isinstance(cls, type) and dataclasses.is_dataclass(cls) and cls.__module__ == info.name):
            continue
        d = {"params": text(cls.__dataclass_params__), "doc": cls.__doc__,
             "match_args": list(getattr(cls, "__match_args__", ())), "keys": list(vars(cls)),
             "hash": "none" if cls.__hash__ is None else
                     (function(cls.__hash__) if isinstance(cls.__hash__, types.FunctionType) else text(cls.__hash__)),
             "fields": [[f.name, text(f.type), text(f.default), text(f.default_factory), f.init, f.repr,
                         f.compare, text(f.hash), f.kw_only, text(f.metadata)] for f in dataclasses.fields(cls)]}
        for attr in ("__init__", "__repr__", "__eq__", "__setattr__", "__delattr__"):
            value = vars(cls).get(attr)
            d[attr] = function(value) if isinstance(value, types.FunctionType) else text(value)
        seen[f"{info.name}.{cls.__qualname__}"] = d
if mode == "kept":
    kept.STORE.save(force=True)
print(json.dumps(seen, sort_keys=True))
"""


def _describe(mode: str, store: Path) -> dict:
    out = subprocess.run(
        [sys.executable, "-c", _DESCRIBE, mode, str(store)],
        capture_output=True,
        text=True,
        check=True,
        cwd=ROOT,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
    )
    return json.loads(out.stdout)


def test_every_package_dataclass_equals_the_standard_librarys(tmp_path):
    store = tmp_path / "kept.marshal"
    plain = _describe("plain", store)
    fresh = _describe("kept", store)  # compiled afresh, then written
    assert store.exists()
    read_back = _describe("kept", store)  # every method from the file
    assert len(plain) > 100
    assert fresh.keys() == plain.keys()
    for name in plain:
        assert fresh[name] == plain[name], name
        assert read_back[name] == plain[name], name


# --------------------------------------------------------------------------
# behaviour on the same class body, against the standard decorator

_BODY = '''
class Pair:
    """A sample record."""
    name: str
    values: tuple = ()
    notes: list = dataclasses.field(default_factory=list, compare=False)
    weight: float = dataclasses.field(default=1.0, repr=False)
    tag: str = dataclasses.field(default="x", kw_only=True)

    def total(self):
        return sum(self.values) * self.weight
'''


def _two(decorated, module: str, body: str = _BODY, name: str = "Pair"):
    """The class of ``body`` under the standard decorator and under ``decorated``, same module name."""
    out = []
    for deco in (dataclasses.dataclass(frozen=True, eq=decorated[1]), decorated[0]):
        ns = {"dataclasses": dataclasses, "__name__": module}
        exec(compile(body, "<class body>", "exec", dont_inherit=True), ns)  # no __future__ flags of this file
        cls = deco(ns[name])
        setattr(sys.modules[module], name, cls)  # so that pickle finds it
        out.append(cls)
    return out


@pytest.fixture
def pair_classes():
    std, ours = _two((frozen_dataclass, True), __name__)
    yield std, ours
    del sys.modules[__name__].Pair


def test_eq_hash_repr_fields_replace_asdict_match_args(pair_classes):
    std, ours = pair_classes
    a, b = std("a", (1, 2), tag="t"), ours("a", (1, 2), tag="t")
    assert repr(a) == repr(b) == "Pair(name='a', values=(1, 2), notes=[], tag='t')"
    assert hash(a) == hash(b) == hash(ours("a", (1, 2), [9], tag="t"))
    assert b == ours("a", (1, 2), [9], tag="t") and b != ours("a", (1,), tag="t")
    assert [(f.name, f.default, f.default_factory, f.repr, f.compare, f.kw_only) for f in dataclasses.fields(a)] == [
        (f.name, f.default, f.default_factory, f.repr, f.compare, f.kw_only) for f in dataclasses.fields(b)
    ]
    assert repr(dataclasses.replace(a, name="z")) == repr(dataclasses.replace(b, name="z"))
    assert dataclasses.asdict(a) == dataclasses.asdict(b)
    assert std.__match_args__ == ours.__match_args__ == ("name", "values", "notes", "weight")
    assert std.__doc__ == ours.__doc__ and b.total() == 3.0
    assert ours("q").notes is not ours("q").notes  # default_factory called per instance
    for attr in ("__init__", "__eq__", "__setattr__", "__delattr__", "__hash__"):
        assert getattr(std, attr).__code__ == getattr(ours, attr).__code__, attr
        assert getattr(std, attr).__qualname__ == getattr(ours, attr).__qualname__ == f"Pair.{attr}"
    assert std.__repr__.__wrapped__.__code__ == ours.__repr__.__wrapped__.__code__


def test_frozen_errors_are_the_standard_ones(pair_classes):
    std, ours = pair_classes
    messages = []
    for cls in (std, ours):
        obj = cls("a")
        with pytest.raises(dataclasses.FrozenInstanceError) as set_err:
            obj.name = "b"
        with pytest.raises(dataclasses.FrozenInstanceError) as del_err:
            del obj.name
        messages.append((str(set_err.value), str(del_err.value)))
    assert messages[0] == messages[1] == ("cannot assign to field 'name'", "cannot delete field 'name'")


def test_pickle_round_trip(pair_classes):
    _, ours = pair_classes
    obj = ours("a", (1, 2), [3], 2.0, tag="t")
    back = pickle.loads(pickle.dumps(obj))
    assert back == obj and back.notes == [3] and back.weight == 2.0 and back.tag == "t"


def test_eq_false_keeps_identity_equality_and_object_hash():
    body = '''
class Handle:
    """Compared by identity."""
    key: int
'''
    std, ours = _two((frozen_dataclass(eq=False), False), __name__, body, "Handle")
    try:
        for cls in (std, ours):
            x = cls(1)
            assert x != cls(1) and x == x and hash(x) == object.__hash__(x)
            assert "__eq__" not in vars(cls) and "__hash__" not in vars(cls)
        assert repr(std(1)) == repr(ours(1)) == "Handle(key=1)"
    finally:
        del sys.modules[__name__].Handle


def test_a_class_without_docstring_gets_the_standard_signature_doc():
    body = "class Bare:\n    x: int\n    y: str = 'a'\n"
    std, ours = _two((frozen_dataclass, True), __name__, body, "Bare")
    del sys.modules[__name__].Bare
    assert std.__doc__ == ours.__doc__ == "Bare(x: int, y: str = 'a')"


# --------------------------------------------------------------------------
# the kept-code file


def test_store_round_trip_and_bad_files_are_ignored(tmp_path):
    path = tmp_path / "k.marshal"
    source = "def __create_fn__():\n def f(self):\n  return 1\n return f"
    first = CodeStore(path)
    code = first.code(source)
    assert code == compile(source, "<string>", "exec", dont_inherit=True)
    assert first.save(force=True) and path.exists()
    assert CodeStore(path).code(source) == code
    for junk in (b"", b"\x00\x01\x02\x03garbage", path.read_bytes()[:40]):
        path.write_bytes(junk)
        assert CodeStore(path).code(source) == code


def test_store_does_not_write_without_new_code_or_when_bytecode_is_off(tmp_path, monkeypatch):
    path = tmp_path / "k.marshal"
    store = CodeStore(path)
    assert not store.save()
    store.code("x = 1")
    monkeypatch.setattr(sys, "dont_write_bytecode", True)
    assert not store.save() and not path.exists()
    monkeypatch.setattr(sys, "dont_write_bytecode", False)
    assert store.save() and path.exists()


def test_other_threads_and_future_flags_are_untouched(tmp_path):
    # a method with a return annotation: compiled without this module's ``from __future__ import annotations``
    body = '''
class Typed:
    """x"""
    x: int
'''
    std, ours = _two((frozen_dataclass(store=CodeStore(tmp_path / "t")), True), __name__, body, "Typed")
    del sys.modules[__name__].Typed
    assert ours.__init__.__annotations__ == std.__init__.__annotations__ == {"x": int, "return": None}
    made = []
    thread = threading.Thread(target=lambda: made.append(dataclasses.dataclass(frozen=True)(type("T", (), {}))))
    thread.start()
    thread.join()
    assert made and made[0]() == made[0]()
