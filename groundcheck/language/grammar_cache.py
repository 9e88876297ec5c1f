"""Where the compiled plan grammar is kept between runs: a file in the user's cache folder.

Compiling ``plan.lark`` into LALR tables takes longer than reading a plan of usual size; lark can
save the tables and read them back (its ``cache`` option).  The file lives in
``$XDG_CACHE_HOME/groundcheck`` (or ``~/.cache/groundcheck``), never in the installed package; its
name holds a hash of the grammar's text, of lark's version, of Python's version and of whether
lark-cython runs the parser, so a changed grammar or library never reads stale tables.  The cache
is only an optimisation: a folder that cannot be made or written, or that another user could write
into (the file is a pickle), means no cache, silently, and the grammar is compiled as before.
"""

from __future__ import annotations

import hashlib
import sys

from ..core.cache import cache_folder, is_private

__all__ = ["cache_folder", "cached_grammar_file"]


def cached_grammar_file(grammar: str, plugin: str) -> str | None:
    """The file lark should read this grammar's tables from, or write them to; None for no cache.

    lark writes the file in place (its hash of the options includes the file's name, so the tables
    cannot be written elsewhere and renamed): a run that meets a half-written file fails to read
    it, compiles the grammar and writes the file again, which lark does by itself.
    """
    from lark import __version__ as lark_version

    folder = cache_folder()
    if folder is None:
        return None
    key = "\0".join((grammar, lark_version, sys.version, plugin))
    final = folder / f"plan-grammar-{hashlib.sha256(key.encode('utf-8')).hexdigest()[:24]}.lark"
    try:
        st = final.lstat()
    except FileNotFoundError:
        return str(final)
    except OSError:
        return None
    if not final.is_file() or final.is_symlink() or not is_private(st):
        return None
    return str(final)
