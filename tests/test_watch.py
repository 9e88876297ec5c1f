"""The live view (``groundcheck watch``) in a real headless Chromium: the page follows the plan's
edits, shows a plan error with its place over the greyed last good result, highlights a finding's
elements, shows a conductor's figures; the server answers this computer only and stops cleanly on
SIGTERM, leaving no file behind."""

from __future__ import annotations

import json
import queue
import re
import shutil
import signal
import socket
import struct
import subprocess
import sys
import threading
import time
import urllib.error
import urllib.request

import pytest

from browser import CHROMIUM, Browser
from helpers import ROOT

pytestmark = pytest.mark.skipif(
    CHROMIUM is None,
    reason="headless Chromium is not installed (Debian package 'chromium'; .ci/run installs it)",
)

EXAMPLE = ROOT / "examples" / "guitar-head.gplan"
MISTAKE = "wire filt_lead: filt_neg to v1_k, 140 mm, 0.5 mm2, return"
MENDED = "wire filt_lead: filt_neg to res_neg, 72 mm, 0.5 mm2, return"


def _start(plan, *extra):
    proc = subprocess.Popen(
        [sys.executable, "-m", "groundcheck", "watch", str(plan), "--port", "0", *extra],
        stderr=subprocess.PIPE,
        stdout=subprocess.DEVNULL,
        text=True,
        cwd=plan.parent,
    )
    proc.lines = queue.Queue()  # its standard error, line by line, read by a thread of its own
    proc.reader = threading.Thread(
        target=lambda: [proc.lines.put(x) for x in proc.stderr], daemon=True
    )
    proc.reader.start()
    first = _line(proc)
    m = re.search(r"http://127\.0\.0\.1:(\d+)/([\w-]+)/", first)
    assert m, first
    proc.token = m.group(2)
    return proc, int(m.group(1))


def _line(proc, timeout: float = 30.0) -> str:
    return proc.lines.get(timeout=timeout)


def _stop(proc, how=signal.SIGTERM) -> str:
    """A signal (SIGTERM, or SIGINT as Ctrl-C sends), then everything it wrote to standard error
    not read yet."""
    proc.send_signal(how)
    proc.wait(45)  # a bound, not a timing (well under a second here)
    proc.reader.join(10)
    out = []
    while not proc.lines.empty():
        out.append(proc.lines.get())
    return "".join(out)


def _edit(path, old, new):
    text = path.read_text()
    assert old in text
    path.write_text(text.replace(old, new))


def _page_verdict(browser) -> str:
    return browser.js("document.getElementById('badge').textContent")


@pytest.fixture
def watched(tmp_path):
    plan = tmp_path / "head.gplan"
    plan.write_text(EXAMPLE.read_text())
    proc, port = _start(plan)
    browser = Browser(
        f"http://127.0.0.1:{port}/{proc.token}/", str(tmp_path.parent / f"{tmp_path.name}-profile")
    )
    yield plan, proc, port, browser
    browser.close()
    if proc.poll() is None:
        proc.kill()
        proc.wait()


def test_the_page_follows_edits_errors_and_clicks(watched, tmp_path):
    plan, proc, port, browser = watched
    browser.wait_for("document.getElementById('badge').textContent === 'worst finding: fault'")
    assert browser.js("document.querySelectorAll('#physical svg, #topology svg').length") == 2
    # hovering a finding marks its elements in both drawings and shows its plan line (hovered again
    # until it holds: a state the server sends meanwhile, on a busy machine, redraws the page and
    # clears the marks)
    browser.wait_for(
        "(document.querySelector('tr.finding').dispatchEvent(new MouseEvent('mouseenter')), "
        "document.querySelectorAll('#physical .hl').length >= 1 && "
        "document.querySelectorAll('#topology .hl').length >= 1)"
    )
    assert "head.gplan:" in browser.js("document.getElementById('planline').textContent")
    # clicking a conductor in the drawing shows its figures
    browser.js(
        "document.querySelector('#physical g.edge.gc-k_5f_gnd').dispatchEvent(new "
        "MouseEvent('click'))"
    )
    inspect = browser.js("document.getElementById('inspect').textContent")
    # 90 mm of 0.5 mm2 annealed copper at 20 C: 17.241 nohm·m (IEC 60028) x 0.09 m / 0.5 mm2 =
    # 3.103 mohm
    assert "k_gnd" in inspect and "resistance3.103mΩ" in inspect.replace(" ", "")

    # a plan error: its place on the page, the last good drawing kept and greyed
    plan.write_text(plan.read_text() + "wire broken: star to\n")
    browser.wait_for("document.getElementById('badge').textContent === 'plan error'")
    errors = browser.js("document.getElementById('errors').textContent")
    assert re.search(r"head\.gplan:\d+:\d+", errors), errors
    assert browser.js("document.body.classList.contains('stale')")
    assert browser.js("document.querySelectorAll('#physical svg').length") == 1

    # the mend: the filter's return joined to the reservoir clears the shared-return finding
    plan.write_text(
        plan.read_text().replace("wire broken: star to\n", "").replace(MISTAKE, MENDED)
    )
    expected = json.loads(
        subprocess.run(
            [sys.executable, "-m", "groundcheck", "check", str(plan), "--format", "json"],
            capture_output=True,
            text=True,
        ).stdout
    )
    worst = expected["summary"]["worst"]
    want = "clean" if worst is None else f"worst finding: {worst}"
    browser.wait_for("!document.body.classList.contains('stale')")
    assert _page_verdict(browser) == want
    changes = browser.js("document.getElementById('sec-changes').textContent")
    assert "cleared GC102" in changes and "dBV" in changes
    assert "GC102" not in browser.js("document.getElementById('sec-findings').textContent")
    browser.screenshot(tmp_path / "live.png")

    err = _stop(proc)
    assert proc.returncode == 0 and "live view stopped" in err and "Traceback" not in err
    # one status line per change: the first analysis, the error, the mend
    assert len(re.findall(r"^\d\d:\d\d:\d\d  ", err, flags=re.M)) >= 2
    assert "plan error: " in err
    assert sorted(p.name for p in tmp_path.iterdir()) == ["head.gplan", "live.png"]


def test_the_server_answers_this_computer_only(tmp_path):
    plan = tmp_path / "head.gplan"
    plan.write_text(EXAMPLE.read_text())
    proc, port = _start(plan)
    try:
        base = f"http://127.0.0.1:{port}/{proc.token}"
        with urllib.request.urlopen(f"{base}/state", timeout=10) as r:
            assert json.loads(r.read())["ok"] is True
        # without the token of the printed address (another user or process of this computer):
        # refused, the page, the state and the event stream alike
        for path in ("/", "/state", "/events", f"/{proc.token[:-1]}/state"):
            with pytest.raises(urllib.error.HTTPError) as e:
                urllib.request.urlopen(f"http://127.0.0.1:{port}{path}", timeout=10)
            assert e.value.code == 403
        # a request naming another host (a page elsewhere rebinding its name to 127.0.0.1) is
        # refused
        req = urllib.request.Request(f"{base}/state", headers={"Host": f"example.test:{port}"})
        with pytest.raises(urllib.error.HTTPError) as e:
            urllib.request.urlopen(req, timeout=10)
        assert e.value.code == 403
        # bound to 127.0.0.1 only: another address of this computer is not served
        with pytest.raises(OSError):
            socket.create_connection(("127.0.0.2", port), timeout=2).close()
        with urllib.request.urlopen(f"{base}/", timeout=10) as r:
            csp = r.headers["Content-Security-Policy"]
            page = r.read().decode()
        assert "script-src 'nonce-" in csp and "default-src 'none'" in csp
        assert not re.search(r'(src|href)\s*=\s*"https?:', page)  # no network fetches
        assert "Never lift the protective earth" in page
    finally:
        err = _stop(proc)
    assert proc.returncode == 0 and "Traceback" not in err


def test_watch_refuses_what_it_cannot_watch(tmp_path, cli):
    code, _, err = cli("watch", str(tmp_path / "missing.gplan"))
    assert code == 2 and "no such file" in err and "\n" == err[-1] and err.count("\n") == 1
    code, _, err = cli("watch", str(EXAMPLE), "--port", "70000")
    assert code == 2 and "out of range" in err
    busy = socket.socket()
    busy.bind(("127.0.0.1", 0))
    busy.listen()
    try:
        code, _, err = cli("watch", str(EXAMPLE), "--port", str(busy.getsockname()[1]))
        assert code == 2 and "cannot serve on 127.0.0.1" in err and "another --port" in err
    finally:
        busy.close()


def test_status_line_follows_a_save_quickly(tmp_path):
    """The terminal's status line after a save: the new verdict and hum (latency is measured in
    benchmarks/)."""
    plan = tmp_path / "head.gplan"
    plan.write_text(EXAMPLE.read_text())
    proc, port = _start(plan)
    try:
        assert "GC102" in _line(proc) + _line(proc)
        time.sleep(0.5)
        _edit(plan, MISTAKE, MENDED)
        line = _line(proc)
        assert (
            re.match(r"\d\d:\d\d:\d\d  ", line)
            and "GC102" not in line
            and "dBV" in line
            and " ms" in line
        )
    finally:
        err = _stop(proc, signal.SIGINT)
    assert proc.returncode == 0 and "live view stopped" in err and "Traceback" not in err
    assert sorted(p.name for p in tmp_path.iterdir()) == ["head.gplan"]


def test_a_placed_device_plan_is_watched_too(tmp_path):
    shutil.copytree(ROOT / "examples" / "studio", tmp_path / "studio")
    device = tmp_path / "studio" / "devices" / "valve-line-preamp.gplan"
    proc, _ = _start(tmp_path / "studio" / "project-studio.gplan")
    try:
        _line(proc), _line(proc)  # the caution, the first analysis
        time.sleep(0.5)
        device.write_text(device.read_text() + "oops here\n")
        line = _line(proc)
        assert "plan error: " in line and "valve-line-preamp.gplan:" in line
    finally:
        _stop(proc)
    assert proc.returncode == 0


def test_a_link_swapped_in_is_refused_and_early_closes_are_quiet(tmp_path):
    (tmp_path / "proj").mkdir()
    plan = tmp_path / "proj" / "head.gplan"
    plan.write_text(EXAMPLE.read_text())
    (tmp_path / "secret.gplan").write_text('plan "s"\nSECRET-LINE-42\n')
    proc, port = _start(plan)
    try:
        _line(proc), _line(proc)  # the caution, the first analysis
        for _ in range(3):  # a client that closes before reading the answer
            s = socket.create_connection(("127.0.0.1", port))
            s.send(f"GET /{proc.token}/state HTTP/1.1\r\nHost: 127.0.0.1:{port}\r\n\r\n".encode())
            s.close()
        time.sleep(0.5)
        plan.unlink()
        plan.symlink_to(tmp_path / "secret.gplan")
        line = _line(proc)
        while "link out of the plan's folder" not in line:
            line = _line(proc)
        with urllib.request.urlopen(
            f"http://127.0.0.1:{port}/{proc.token}/state", timeout=10
        ) as r:
            assert "SECRET" not in r.read().decode()
    finally:
        err = _stop(proc)
    assert "Traceback" not in err and "SECRET" not in err


def test_a_connection_closed_mid_answer_is_no_error():
    # the browser closes the connection (a reload, a closed tab) while the answer is written: the
    # handler ends that connection quietly instead of raising, so the terminal shows no traceback
    from groundcheck.cli.watch import LiveHandler

    class Closed:
        def write(self, data):
            raise BrokenPipeError(32, "Broken pipe")

        def flush(self):
            raise BrokenPipeError(32, "Broken pipe")

    h = LiveHandler.__new__(LiveHandler)
    h.request_version, h.requestline, h.command, h.wfile = (
        "HTTP/1.1",
        "GET / HTTP/1.1",
        "GET",
        Closed(),
    )
    h.close_connection = False
    h._send(200, b"{}", "application/json")
    assert h.close_connection


def _reset(s) -> None:
    """Close a client socket as a browser dropping a connection does: a reset, not a goodbye."""
    s.setsockopt(socket.SOL_SOCKET, socket.SO_LINGER, struct.pack("ii", 1, 0))
    s.close()


def _events_until(stream, wanted: str, timeout: float = 60.0) -> str:
    """What an open event stream sends until ``wanted`` has come."""
    got, end = "", time.monotonic() + timeout
    while wanted not in got:
        stream.settimeout(max(0.1, end - time.monotonic()))
        chunk = stream.recv(65536).decode()
        assert chunk, got
        got += chunk
    return got


def test_an_update_is_announced_and_reset_connections_are_quiet(tmp_path):
    plan = tmp_path / "head.gplan"
    plan.write_text(EXAMPLE.read_text())
    proc, port = _start(plan)
    request = f"GET /{proc.token}/{{}} HTTP/1.1\r\nHost: 127.0.0.1:{port}\r\n\r\n"
    try:
        _line(proc), _line(proc)  # the caution, the first analysis
        stream = socket.create_connection(("127.0.0.1", port))
        stream.send(request.format("events").encode())
        _events_until(stream, "event: state")
        # a save: the page is told the plan is being analysed before the work starts, then the
        # new state
        _edit(plan, MISTAKE, MENDED)
        got = _events_until(stream, "event: state")
        assert re.search(r"event: analysing\ndata: \d+\.\d\n\n.*event: state", got, re.S), got
        stream.close()
        # browsers that reset their connections: before asking anything, after asking the state
        # (its keep-alive connection), on the event stream
        for what in (None, "state", "events"):
            for _ in range(2):
                s = socket.create_connection(("127.0.0.1", port))
                if what:
                    s.send(request.format(what).encode())
                time.sleep(0.2)
                _reset(s)
        time.sleep(0.5)
        with urllib.request.urlopen(
            f"http://127.0.0.1:{port}/{proc.token}/state", timeout=10
        ) as r:  # still serving
            assert json.loads(r.read())["ok"] is True
    finally:
        err = _stop(proc)
    assert proc.returncode == 0 and "live view stopped" in err
    assert "Traceback" not in err and "Exception" not in err and "Error" not in err, err


def test_a_page_opened_on_a_broken_plan_shows_the_last_good_result_and_updates_say_so(tmp_path):
    plan = tmp_path / "head.gplan"
    plan.write_text(EXAMPLE.read_text())
    proc, port = _start(plan)
    browser = None
    try:
        _line(proc), _line(proc)  # the caution, the first analysis
        plan.write_text(plan.read_text() + "wire broken: star to\n")
        while "plan error: " not in _line(proc):
            pass
        # opened (or reloaded) only now: the last good result, greyed, under the errors
        browser = Browser(
            f"http://127.0.0.1:{port}/{proc.token}/", str(tmp_path.parent / f"{tmp_path.name}-p")
        )
        browser.wait_for("document.getElementById('badge').textContent === 'plan error'")
        assert browser.js("document.body.classList.contains('stale')")
        assert browser.js("document.querySelectorAll('#physical svg, #topology svg').length") == 2
        assert "GC102" in browser.js("document.getElementById('sec-findings').textContent")
        assert "dBV" in browser.js("document.getElementById('sec-hum').textContent")
        assert re.search(
            r"head\.gplan:\d+:\d+", browser.js("document.getElementById('errors').textContent")
        )
        # the mend (with a figure changed, so that it is analysed again: a plan back to the last
        # one analysed shows that result at once): the status line says the plan is being
        # analysed, with the seconds, until the new result is shown
        browser.js(
            "window.said = []; new MutationObserver(function () { window.said.push("
            "document.getElementById('status').textContent); }).observe("
            "document.getElementById('status'), {childList: true, characterData: true, "
            "subtree: true}); true"
        )
        plan.write_text(
            plan.read_text().replace("wire broken: star to\n", "").replace(MISTAKE, MENDED)
        )
        browser.wait_for("!document.body.classList.contains('stale')")
        said = browser.js("window.said")
        assert any(re.fullmatch(r"re-analysing the plan… \d+ s", x) for x in said), said
        assert said[-1].startswith("updated "), said
    finally:
        if browser is not None:
            browser.close()
        err = _stop(proc)
    assert proc.returncode == 0 and "Traceback" not in err


def test_a_save_that_changes_no_statement_is_not_analysed_again(tmp_path, monkeypatch):
    # a comment added (the same statements at the same places): the last result and drawings are
    # published again at once; a changed figure is analysed again
    import io

    import groundcheck.analysis as analysis
    from groundcheck.analysis import Options
    from groundcheck.cli.watch import LiveView

    plan = tmp_path / "head.gplan"
    plan.write_text(EXAMPLE.read_text())
    calls = []
    real = analysis.analyze
    monkeypatch.setattr(analysis, "analyze", lambda p, o: calls.append(1) or real(p, o))
    log = io.StringIO()
    view = LiveView(str(plan), Options(), log=log)
    view.refresh()
    plan.write_text(plan.read_text() + "# checked with the builder\n")
    first = json.loads(view.state)
    view.refresh()
    again = json.loads(view.state)
    assert len(calls) == 1 and "the plan's content unchanged" in log.getvalue()
    assert view.version == 2 and again["sections"]["findings"] == first["sections"]["findings"]
    _edit(plan, MISTAKE, MENDED)
    view.refresh()
    assert len(calls) == 2 and "GC102" not in log.getvalue().splitlines()[-1]
