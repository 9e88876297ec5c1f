"""The loader's expansion of statements into records: each statement built, each block placement
walked with its names prefixed and its positions moved, the element, placement and rectifier limits
checked as it goes (a placement's totals counted before it is expanded), and every error said once
however many placements repeat it."""

from __future__ import annotations

from ..core.errors import LimitError, PlanError
from ..model.records import PE_POINT
from .assemble import HEADER_KEYWORDS
from .limits import LIMITS
from .phrases import Statement
from .placement import Transform, place
from .statements import KEYWORDS, build, builder_of
from .syntax import suggest_keyword

__all__ = ["Expander"]


class Expander:
    """The expansion part of the loader: needs the block part (:class:`~.blocks.BlockIndex`) and
    the loader's counts, errors and placement notes."""

    def count_placement(self, block: str, st: Statement, depth: int) -> None:
        """A top-level placement's elements and statements walked, counted before it is expanded
        (every nested placement included); a LimitError when either total is over its limit."""
        if depth == 0:
            self.placed += self.block_size(block)
            self.walked += self.block_walk(block)
        if self.walked > LIMITS["placed_statements"]:
            raise LimitError(
                f"block placements walk {self.walked:,} statements or more, over the limit of "
                f"{LIMITS['placed_statements']:,} (counted before expanding)",
                st.loc,
                "a block placed inside blocks multiplies, its errors too; place fewer",
            )
        if self.placed > LIMITS["placed_elements"]:
            raise LimitError(
                f"block placements expand to {self.placed:,} elements or more, over the limit of "
                f"{LIMITS['placed_elements']:,} (counted before expanding)",
                st.loc,
                "a block placed inside blocks multiplies; place fewer, or write a large flat plan",
            )

    def expand(
        self,
        items: list,
        prefix: str,
        tf: Transform,
        scopes: tuple,
        depth: int,
        path: tuple[str, ...],
        out: list,
    ) -> None:
        """Build every item into ``out`` as ``(statement, record, refs)``, placements expanded;
        ``prefix``, ``tf`` and ``scopes`` are those of the enclosing placement (empty at the top
        level), ``path`` the blocks being placed.  Errors go to ``self.errors``."""
        for it in items:
            if self.stopped:  # a limit was reached: nothing more is expanded
                return
            if isinstance(it, tuple):  # a block definition
                if prefix:
                    self.errors.append(
                        PlanError(
                            "blocks are defined at the top level of a file",
                            it[1].loc,
                            "move the block out",
                        )
                    )
                continue
            st: Statement = it
            if prefix:
                self.placed_at.setdefault((st.loc.file, st.loc.line), []).append(
                    prefix.rstrip(".")
                )
            try:
                if st.keyword == "place":
                    self._expand_placement(st, prefix, tf, scopes, depth, path, out)
                else:
                    self._expand_statement(st, prefix, tf, scopes, out)
            except PlanError as e:
                self._failed(st, prefix, e)
                if isinstance(e, LimitError):
                    return

    def _expand_placement(
        self, st: Statement, prefix: str, tf, scopes: tuple, depth: int, path: tuple, out: list
    ) -> None:
        """A ``place`` statement: the block's body expanded under the placement's name and
        transform, inside the enclosing ones."""
        block, sub, inner_tf = self.parse_place(st)
        if block in path:
            raise PlanError(
                f"block {block!r} places itself",
                st.loc,
                "a block cannot contain itself, directly or not",
            )
        if depth + 1 > LIMITS["block_depth"]:
            raise LimitError(
                f"blocks placed more than {LIMITS['block_depth']} deep",
                st.loc,
                "flatten the blocks",
            )
        self.count_placement(block, st, depth)
        new_prefix = f"{prefix}{sub}."
        self.expand(
            self.blocks[block].body,
            new_prefix,
            inner_tf.then(tf),
            ((new_prefix, self.local_names(block)),) + scopes,
            depth + 1,
            path + (block,),
            out,
        )

    def _expand_statement(self, st: Statement, prefix: str, tf, scopes: tuple, out: list) -> None:
        """An element or header statement built into its record, placed in the enclosing
        placement."""
        if builder_of(st.keyword) is None:
            raise PlanError(
                f"unknown keyword {st.keyword!r}",
                st.loc,
                suggest_keyword(st.keyword, KEYWORDS),
            )
        if st.broken:
            if st.label:
                self.broken.add(prefix + st.label)
            if st.keyword == "mains":  # its inlet's terminal: nothing else complains of it
                self.broken.add(prefix + PE_POINT)
            return
        if prefix and st.keyword in HEADER_KEYWORDS:
            raise PlanError(
                f"'{st.keyword}' belongs at the top level, not inside a block",
                st.loc,
                "move it out of the block",
            )
        if st.keyword == "rectifier":
            self.rectifiers += 1  # each is simulated in time: refused before the rest is built
            if self.rectifiers > LIMITS["rectifiers"]:
                raise LimitError(
                    f"the plan has more than {LIMITS['rectifiers']} rectifiers, the limit "
                    "(each is simulated in time)",
                    st.loc,
                    "describe a rack's identical supplies once, or split the installation",
                )
        record, refs = build(st)
        self.count += 1
        if self.count > LIMITS["elements"]:
            raise LimitError(
                f"plan expands to more than {LIMITS['elements']} elements",
                st.loc,
                "a block placed inside blocks multiplies; place fewer",
            )
        out.append(
            (st, place(record, st, prefix, tf, scopes, self.outer_names, self.shadowed), refs)
        )

    def _failed(self, st: Statement, prefix: str, e: PlanError) -> None:
        """A statement's error, said once (not once per placement); its name marked broken, so
        that nothing else complains of it; a limit stops the expansion."""
        if not prefix or (e.location, e.message) not in self._said:
            self._said.add((e.location, e.message))
            self.errors.append(e)
        if st.label:
            self.broken.add(prefix + st.label)
        if st.keyword == "mains":  # its inlet's terminal: nothing else complains of it
            self.broken.add(prefix + PE_POINT)
        if isinstance(e, LimitError):
            self.stopped = True
