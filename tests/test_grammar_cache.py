"""The compiled plan grammar kept in the user's cache folder (groundcheck.language.grammar_cache):
read back when present, keyed by the grammar's text, never written into the package, and never the
cause of a failed run — a folder that cannot be made, one that others may write into, a damaged
file."""

import os
from pathlib import Path

import lark
import pytest

import groundcheck
from groundcheck.language import grammar_cache, syntax
from helpers import EXAMPLES

PACKAGE = Path(groundcheck.__file__).resolve().parent


@pytest.fixture
def fresh(monkeypatch, tmp_path):
    """A cache home of the test's own, and the process's parser made again from it (and again
    after)."""
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    syntax._parser.cache_clear()
    yield tmp_path / "cache"
    syntax._parser.cache_clear()


def _no_compiling(*args, **kwargs):
    raise AssertionError("the grammar was compiled although its tables were in the cache")


def _statements(path) -> list:
    errors = []
    items, _ = syntax.parse_text(Path(path).read_text(encoding="utf-8"), str(path), errors)
    assert errors == []
    return [
        repr((x[1].name, x[1].loc, x[1].body)) if isinstance(x, tuple) else repr(x) for x in items
    ]


def test_the_tables_are_saved_then_read_back_with_the_same_results(fresh, monkeypatch):
    compiled = _statements(EXAMPLES[0])
    files = list((fresh / "groundcheck").iterdir())
    assert len(files) == 1 and files[0].name.startswith("plan-grammar-")
    assert (fresh / "groundcheck").stat().st_mode & 0o077 == 0  # private to the user
    syntax._parser.cache_clear()

    monkeypatch.setattr(lark.Lark, "_build_parser", _no_compiling)
    for example in EXAMPLES:
        cached = _statements(example)
        assert cached
    assert _statements(EXAMPLES[0]) == compiled


def test_a_changed_grammar_gets_another_file(fresh):
    text = syntax.grammar_text()
    assert grammar_cache.cached_grammar_file(text, "") != grammar_cache.cached_grammar_file(
        text + "\n", ""
    )
    assert grammar_cache.cached_grammar_file(text, "") != grammar_cache.cached_grammar_file(
        text, "lark-cython"
    )


def test_nothing_is_written_into_the_package(fresh):
    _statements(EXAMPLES[0])
    # the grammar is groundcheck/grammar when installed, grammar/ beside the package in a checkout
    folders = [PACKAGE, PACKAGE.parent / "grammar"]
    grammars = sorted(
        p.name
        for f in folders
        if f.is_dir()
        for p in f.rglob("*")
        if p.is_file() and "grammar" in p.parts and not p.name.endswith((".py", ".pyc"))
    )
    assert grammars == ["plan.lark"]
    assert not any(PACKAGE.rglob("*.tmp"))


def test_a_folder_that_cannot_be_made_means_no_cache(monkeypatch, tmp_path):
    blocker = tmp_path / "a-file"
    blocker.write_text("not a folder")
    monkeypatch.setenv("XDG_CACHE_HOME", str(blocker))
    syntax._parser.cache_clear()
    try:
        assert grammar_cache.cache_folder() is None
        assert _statements(EXAMPLES[0])
    finally:
        syntax._parser.cache_clear()


def test_a_folder_others_may_write_is_not_used(fresh):
    folder = fresh / "groundcheck"
    folder.mkdir(parents=True)
    os.chmod(folder, 0o777)
    assert grammar_cache.cache_folder() is None
    assert _statements(EXAMPLES[0])
    assert list(folder.iterdir()) == []


def test_a_relative_cache_home_is_ignored(monkeypatch, tmp_path):
    # the XDG base directory specification: a relative path is invalid and ignored
    monkeypatch.setenv("XDG_CACHE_HOME", "relative/cache")
    monkeypatch.setenv("HOME", str(tmp_path))
    monkeypatch.chdir(tmp_path)
    assert grammar_cache.cache_folder() == tmp_path / ".cache" / "groundcheck"
    assert not (tmp_path / "relative").exists()


def test_a_damaged_file_is_compiled_again_and_replaced(fresh, monkeypatch):
    expected = _statements(EXAMPLES[0])
    (cached,) = (fresh / "groundcheck").iterdir()
    for damaged in (cached.read_bytes()[: cached.stat().st_size // 2], b"\x80garbage"):
        cached.write_bytes(damaged)  # a run killed while writing it; a file of something else
        syntax._parser.cache_clear()
        assert _statements(EXAMPLES[0]) == expected
    # the file was written again, whole: the next run reads it without compiling
    syntax._parser.cache_clear()
    monkeypatch.setattr(lark.Lark, "_build_parser", _no_compiling)
    assert _statements(EXAMPLES[0]) == expected
