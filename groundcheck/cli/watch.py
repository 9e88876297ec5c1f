"""``groundcheck watch``: a live view of a plan in the browser, re-analysed in this process
whenever the plan (or a file it includes or places) is saved.

The server is the standard library's threaded HTTP server, bound to 127.0.0.1 only and answering
only requests addressed to this computer by name (``127.0.0.1`` or ``localhost``, so a web page
elsewhere cannot reach it through a name of its own); the page learns of a new state by server-sent
events.  Files are watched with ``watchfiles`` (the folders holding the plan's files, so editors
that save by renaming are seen).  Nothing is written to disk.
"""

from __future__ import annotations

import json
import secrets
import signal
import sys
import threading
import time
from http.server import BaseHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path

from ..core.caution import CAUTION
from ..core.errors import GroundcheckError, PlanErrors
from .common import UsageError, load_plan, options_of

__all__ = ["serve", "LiveView", "LiveHandler"]

#: how often (s) an idle event stream sends a comment, so a closed browser tab is noticed
KEEP_ALIVE = 10.0


class LiveView:
    """The plan's latest state, re-made on demand, and the condition the event streams wait on."""

    def __init__(self, plan: str, options, renderer: str = "auto", log=sys.stderr):
        self.plan, self.options, self.renderer, self.log = plan, options, renderer, log
        self.changed = threading.Condition()
        self.version = 0
        self.state = b"{}"
        self.files: set[Path] = {Path(plan).resolve()}
        self.token = secrets.token_urlsafe(
            24
        )  # in the address printed: other users and processes lack it
        self.folder = Path(plan).resolve().parent
        self.path = Path(plan).absolute()  # the name watched: a link swapped in for it is seen
        self._good_result = None
        self._good_state: dict | None = None
        self._drawn: tuple | None = None  # the last result's two drawings
        #: when the analysis under way started (time.monotonic()), None when none is; ``busy``
        #: counts the analyses started, so each event stream announces each one once
        self.busy_since: float | None = None
        self.busy = 0

    def refresh(self) -> None:
        """Load, analyse and draw the plan again; publish the new state (or the errors) to every
        page."""
        from ..analysis import analyze
        from ..renderers.formats import source_lines
        from ..renderers.live import error_state, live_state, status_line

        t0 = time.perf_counter()
        self._analysing()
        try:
            self._check_still_a_plan()
            plan = load_plan(self.plan)
            kept = self._kept(plan)
            result = kept[0] if kept else analyze(plan, self.options)
        except PlanErrors as e:
            # the files the errors are in are watched too (a device plan broken since the start,
            # say)
            self.files |= {
                Path(x.location.file).resolve()
                for x in e.errors
                if Path(x.location.file).is_file()
            }
            self._publish(error_state(e.errors, self._good_state))
            self._say(
                f"plan error: {e.errors[0].one_line()}"
                + (f" (and {len(e.errors) - 1} more)" if len(e.errors) > 1 else "")
            )
            return
        except (
            GroundcheckError
        ) as e:  # a file that vanished while the editor saved it, an unreadable include
            self._publish(
                error_state([], self._good_state)
                | {"error": [{"where": self.plan, "message": str(e), "hint": "", "line": ""}]}
            )
            self._say(f"error: {e}")
            return
        read = (*plan.files, *plan.device_files)
        self.files = {Path(f).resolve() for f in read} | {Path(self.plan).resolve()}
        physical, topology = kept[1] if kept else self._drawings(result)
        self._drawn = (physical, topology)
        seconds = time.perf_counter() - t0
        state = live_state(
            result, physical, topology, self._good_result, source_lines(plan), seconds
        )
        self._good_result, self._good_state = result, state
        self._publish(state)
        same = "; the plan's content unchanged" if kept else ""
        self._say(status_line(result, seconds) + same)

    def _kept(self, plan) -> tuple | None:
        """The last result and drawings when the plan as read is the one they were made from (a
        save that changed a comment, blank lines or nothing: the same statements at the same
        places, in every file read), else None: an analysis is a function of the plan and the
        options, which a session keeps."""
        last = self._good_result
        if last is None or self._drawn is None:
            return None
        try:
            return (last, self._drawn) if plan == last.plan else None
        except (TypeError, ValueError):  # a field that does not compare: analyse again
            return None

    def _check_still_a_plan(self) -> None:
        """The watched file is still a regular file inside the plan's folder: a link swapped in for
        it (to a file elsewhere) is refused, so no line of another file reaches the page."""
        p = Path(self.plan)
        if p.is_symlink() and not (
            p.resolve().parent == self.folder or self.folder in p.resolve().parents
        ):
            raise GroundcheckError(f"{self.plan} is now a link out of the plan's folder: not read")
        if p.resolve().parent != self.folder:
            raise GroundcheckError(f"{self.plan} now lies outside the plan's folder: not read")

    def _drawings(self, result):
        """Both drawings as SVG text (None for one that cannot be drawn: no physical view without
        positions or devices)."""
        from ..renderers.dot import has_physical_view
        from ..renderers.formats import both_views

        views, _ = both_views(result, self.renderer, physical=has_physical_view(result.plan))
        return tuple(None if v is None else v[0].decode("utf-8") for v in views)

    def _analysing(self) -> None:
        """Tell every page, before the work starts, that the plan is being analysed again (a large
        plan's update takes seconds: the page says so and counts them)."""
        with self.changed:
            self.busy += 1
            self.busy_since = time.monotonic()
            self.changed.notify_all()

    def _publish(self, state: dict) -> None:
        data = json.dumps(state, ensure_ascii=False, allow_nan=False, default=str).encode("utf-8")
        with self.changed:
            self.version += 1
            self.state = data
            self.busy_since = None
            self.changed.notify_all()

    def _say(self, text: str) -> None:
        from ..core.errors import shown

        self.log.write(f"{time.strftime('%H:%M:%S')}  {shown(text)}\n")
        self.log.flush()


class LiveHandler(BaseHTTPRequestHandler):
    """Answers the page, its state and its event stream; made for one view by
    :func:`make_handler`."""

    view: LiveView
    stop: threading.Event
    server_version = "groundcheck-live"
    protocol_version = "HTTP/1.1"

    def log_message(
        self, *args
    ) -> None:  # the terminal shows one line per change, not per request
        pass

    def _local(self) -> bool:
        port = self.server.server_address[1]
        host = (self.headers.get("Host") or "").strip().lower()
        return self.client_address[0] == "127.0.0.1" and host in (
            f"127.0.0.1:{port}",
            f"localhost:{port}",
        )

    def _send(self, code: int, body: bytes, kind: str, extra: dict | None = None) -> None:
        """One answer; a browser that closed the connection mid-answer (a reload, a closed tab) is
        no error."""
        try:
            self.send_response(code)
            for k, v in {
                "Content-Type": kind,
                "Content-Length": str(len(body)),
                "Cache-Control": "no-store",
                "X-Content-Type-Options": "nosniff",
                **(extra or {}),
            }.items():
                self.send_header(k, v)
            self.end_headers()
            self.wfile.write(body)
        except (
            BrokenPipeError,
            ConnectionResetError,
        ):  # the client went away: nothing to tell anyone
            self.close_connection = True

    def do_GET(self) -> None:  # noqa: N802 - the standard library's name
        if not self._local():
            self._send(
                403,
                b"groundcheck's live view answers this computer only (127.0.0.1)\n",
                "text/plain",
            )
            return
        path = self.path.split("?", 1)[0]
        prefix = f"/{self.view.token}/"
        if not secrets.compare_digest(path[: len(prefix)].encode(), prefix.encode()):
            self._send(
                403,
                b"groundcheck's live view answers the address it printed (with its token) only\n",
                "text/plain",
            )
            return
        path = path[len(prefix) - 1 :]
        if path == "/":
            from ..renderers.live_page import live_page

            nonce = secrets.token_urlsafe(16)
            csp = (
                f"default-src 'none'; script-src 'nonce-{nonce}'; style-src 'unsafe-inline'; "
                "connect-src 'self'; img-src data:; base-uri 'none'; form-action 'none'"
            )
            self._send(
                200,
                live_page(nonce, CAUTION).encode("utf-8"),
                "text/html; charset=utf-8",
                {"Content-Security-Policy": csp, "Referrer-Policy": "no-referrer"},
            )
        elif path == "/state":
            with self.view.changed:  # the first analysis may still be running
                self.view.changed.wait_for(
                    lambda: self.view.version > 0 or self.stop.is_set(), timeout=60
                )
                body = self.view.state
            self._send(200, body, "application/json; charset=utf-8")
        elif path == "/events":
            self._events()
        else:
            self._send(404, b"not found\n", "text/plain")

    def _events(self) -> None:
        self.send_response(200)
        self.send_header("Content-Type", "text/event-stream")
        self.send_header("Cache-Control", "no-store")
        self.end_headers()
        self.close_connection = True
        seen = (-1, -1)  # the state version and the analysis announced last
        try:
            while not self.stop.is_set():
                news, seen = self._news(seen)
                self.wfile.write(news or b": still here\n\n")
                self.wfile.flush()
        except (BrokenPipeError, ConnectionResetError, ConnectionAbortedError):
            pass

    def _news(self, seen: tuple[int, int]) -> tuple[bytes, tuple[int, int]]:
        """The events a stream that has seen ``seen`` is owed, waiting for one up to the keep-alive
        interval: ``state`` when a new state is published (version 0: none yet), then
        ``analysing`` (the seconds it has been running) when an analysis started since."""
        view = self.view
        with view.changed:
            if view.version in (seen[0], 0) and view.busy == seen[1]:
                view.changed.wait(KEEP_ALIVE)
            version, busy, since = view.version, view.busy, view.busy_since
        out = []
        if version not in (seen[0], 0):
            out.append(f"event: state\ndata: {version}\n\n")
        if busy != seen[1] and since is not None:
            out.append(f"event: analysing\ndata: {time.monotonic() - since:.1f}\n\n")
        return "".join(out).encode(), (version if version else seen[0], busy)

    def handle(self) -> None:
        """Answer the connection's requests; a browser that resets it (a reload, a closed tab, a
        request it gave up) ends it quietly, never a traceback on the terminal."""
        try:
            super().handle()
        except (BrokenPipeError, ConnectionResetError, ConnectionAbortedError, TimeoutError):
            self.close_connection = True


def make_handler(view: LiveView, stop: threading.Event) -> type:
    """The request handler class of one live view."""
    return type("Handler", (LiveHandler,), {"view": view, "stop": stop})


def _watch_files(view: LiveView, stop: threading.Event) -> None:
    """Re-check the plan whenever one of its files is saved (until ``stop``); the folders watched
    follow the files the plan includes or places."""
    from watchfiles import watch

    while not stop.is_set():
        files = set(view.files)
        folders = sorted({str(f.parent) for f in files if f.parent.is_dir()})
        if not folders:
            stop.wait(0.5)
            continue
        for changes in watch(
            *folders,
            stop_event=stop,
            debounce=40,
            step=20,
            rust_timeout=500,
            yield_on_timeout=True,
            raise_interrupt=False,
        ):
            if any(
                Path(p).resolve() in files or Path(p).absolute() == view.path for _, p in changes
            ):
                view.refresh()
            if view.files != files:
                break


def serve(args) -> int:
    """Serve the live view of ``args.plan`` until Ctrl-C or SIGTERM; the exit status."""
    if not Path(args.plan).is_file():
        raise UsageError(
            f"cannot watch {args.plan!r}: no such file (give a plan file, not '-' or a folder)"
        )
    if not 0 <= args.port <= 65535:
        raise UsageError(f"port {args.port} is out of range (0 to 65535; 0 picks a free one)")
    view = LiveView(args.plan, options_of(args), args.renderer)
    stop = threading.Event()
    try:
        server = ThreadingHTTPServer(("127.0.0.1", args.port), make_handler(view, stop))
    except OSError as e:
        raise UsageError(
            f"cannot serve on 127.0.0.1:{args.port}: {e.strerror or e} (give another --port, or 0 "
            "for a free one)"
        ) from None
    server.daemon_threads = True
    url = f"http://127.0.0.1:{server.server_address[1]}/{view.token}/"
    sys.stderr.write(
        f"groundcheck: live view of {args.plan} at {url} (this computer only; Ctrl-C "
        f"stops)\ngroundcheck: {CAUTION}\n"
    )
    threads = [
        threading.Thread(target=server.serve_forever, kwargs={"poll_interval": 0.2}, daemon=True),
        threading.Thread(target=_watch_files, args=(view, stop), daemon=True),
    ]
    # SIGTERM stops the view as Ctrl-C does, from the first analysis on (a page can show its
    # result before that analysis has returned)
    previous = signal.signal(signal.SIGTERM, _interrupt)
    previous_int = signal.signal(signal.SIGINT, signal.default_int_handler)
    try:
        for t in threads:  # watching before the first analysis: a save during it is not missed
            t.start()
        view.refresh()
        if args.open:
            import webbrowser

            webbrowser.open(url)
        while not stop.wait(0.5):
            pass
    except KeyboardInterrupt:
        pass
    finally:
        signal.signal(signal.SIGTERM, lambda *_: None)  # a second one while stopping: no matter
        stop.set()
        with view.changed:
            view.changed.notify_all()
        server.shutdown()
        server.server_close()
        signal.signal(signal.SIGTERM, previous)
        signal.signal(signal.SIGINT, previous_int)
    sys.stderr.write("groundcheck: live view stopped\n")
    return 0


def _interrupt(*_) -> None:
    raise KeyboardInterrupt
