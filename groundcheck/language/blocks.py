"""The loader's knowledge of blocks, worked out without expanding them: how many elements and
statements one placement of a block makes (the limits are checked on these counts before any
placement is expanded), the names a block defines, and each ``place`` statement read once."""

from __future__ import annotations

from ..core.errors import PlanError
from .phrases import Reader, Statement
from .placement import Transform
from .syntax import suggest_keyword

__all__ = ["BlockIndex"]


class BlockIndex:
    """The block part of the loader: needs ``self.blocks`` (name -> BlockDef) and the caches set up
    by :meth:`init_blocks`."""

    def init_blocks(self) -> None:
        self._size_cache: dict[str, int] = {}
        self._walk_cache: dict[str, int] = {}
        self._place_cache: dict[int, object] = {}
        self._local_cache: dict[str, set[str]] = {}

    def block_size(self, block: str, seen: tuple[str, ...] = ()) -> int:
        """How many elements one placement of ``block`` makes, counted without expanding it
        (memoised)."""
        if block in self._size_cache:
            return self._size_cache[block]
        bd = self.blocks.get(block)
        if bd is None or block in seen:
            return 0
        n = 0
        for st in bd.body:
            if isinstance(st, tuple):
                continue
            if st.keyword != "place":
                n += 1
                continue
            try:
                inner, _, _ = self.parse_place(st)
            except PlanError:
                continue
            n += self.block_size(inner, seen + (block,))
        self._size_cache[block] = n
        return n

    def block_walk(self, block: str, seen: tuple[str, ...] = ()) -> int:
        """How many statements one placement of ``block`` walks, those that fail included (a
        placement of an undefined block, or of a block already being placed, is one): bounds the
        work even of a broken plan."""
        if block in self._walk_cache:
            return self._walk_cache[block]
        bd = self.blocks.get(block)
        if bd is None or block in seen:
            return 1
        n = 0
        for st in bd.body:
            n += 1
            if not isinstance(st, tuple) and st.keyword == "place":
                try:
                    inner, _, _ = self.parse_place(st)
                except PlanError:
                    continue
                n += self.block_walk(inner, seen + (block,))
        self._walk_cache[block] = n
        return n

    def local_names(self, block: str, seen: tuple[str, ...] = ()) -> set[str]:
        if block in self._local_cache:
            return self._local_cache[block]
        names: set[str] = set()
        bd = self.blocks.get(block)
        if bd is None or block in seen:
            return names
        for st in bd.body:
            if st.label:
                names.add(st.label)
            elif st.keyword == "place":
                try:
                    inner, prefix, _ = self.parse_place(st)
                except PlanError:
                    continue
                names |= {f"{prefix}.{n}" for n in self.local_names(inner, seen + (block,))}
        if not seen:
            self._local_cache[block] = names
        return names

    def parse_place(self, st: Statement) -> tuple[str, str, Transform]:
        """A place statement read once (its error too): a block placed many times walks it many
        times."""
        got = self._place_cache.get(id(st))
        if got is None:
            try:
                got = self._parse_place(st)
            except PlanError as e:
                got = e
            self._place_cache[id(st)] = got
        if isinstance(got, PlanError):
            raise got.with_traceback(None)
        return got

    def _parse_place(self, st: Statement) -> tuple[str, str, Transform]:
        if not st.phrases:
            raise PlanError(
                "place needs a block and a name", st.loc, "e.g. 'place channel as left at 0,0'"
            )
        r = Reader(st.phrases[0], st)
        block, bloc = r.name("a block name")
        if block not in self.blocks:
            hint = (
                suggest_keyword(block, self.blocks)
                if self.blocks
                else "define it with 'block NAME { ... }'"
            )
            raise PlanError(f"undefined block {block!r}", bloc, hint)
        r.expect("as")
        prefix, _ = r.name("a name for this placement")
        ox = oy = 0.0
        if r.keyword("at"):
            ox, oy = r.coord()
        r.finish()
        sx = sy = 1.0
        for ph in st.phrases[1:]:
            r = Reader(ph, st)
            r.expect("mirror")
            axis = r.word("an axis (x or y)", ("x", "y")) if not r.done else "y"
            if axis == "x":
                sx = -1.0
            else:
                sy = -1.0
            r.finish()
        return block, prefix, Transform(ox, oy, sx, sy)
