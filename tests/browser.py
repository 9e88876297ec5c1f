"""A headless Chromium driven over its DevTools protocol on a pipe (``--remote-debugging-pipe``:
commands on file descriptor 3, answers on 4, each message JSON ended by a NUL byte), so the tests
need no client library.

Chromium DevTools Protocol: Target.createTarget, Target.attachToTarget (flatten), Runtime.evaluate.
"""

from __future__ import annotations

import json
import os
import select
import shutil
import subprocess
import time

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")


class Browser:
    """One headless Chromium with one page open at ``url``."""

    def __init__(self, url: str, profile: str):
        to_chrome_r, self._out = os.pipe()
        self._in, from_chrome_w = os.pipe()

        def fds():  # the protocol's descriptors must be 3 and 4 in the child
            a, b = os.dup(to_chrome_r), os.dup(from_chrome_w)
            os.dup2(a, 3)
            os.dup2(b, 4)

        flags = [
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--remote-debugging-pipe",
            f"--user-data-dir={profile}",
            "--window-size=1400,1000",
        ]
        # close_fds=False: the standard library closes descriptors after preexec_fn; ours are made
        # for the child (os.pipe's are not inheritable, so nothing else of this process leaks into
        # Chromium)
        self.proc = subprocess.Popen(
            [CHROMIUM, *flags, "about:blank"],
            close_fds=False,
            preexec_fn=fds,
            stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL,
        )
        os.close(to_chrome_r)
        os.close(from_chrome_w)
        self._id, self._buffer = 0, b""
        target = self.call("Target.createTarget", url=url)["targetId"]
        self.session = self.call("Target.attachToTarget", targetId=target, flatten=True)[
            "sessionId"
        ]

    def call(self, method: str, session: str | None = None, **params) -> dict:
        self._id += 1
        message = {
            "id": self._id,
            "method": method,
            "params": params,
            **({"sessionId": session} if session else {}),
        }
        os.write(self._out, json.dumps(message).encode() + b"\0")
        deadline = time.monotonic() + 30
        while True:
            while b"\0" not in self._buffer:
                ready, _, _ = select.select(
                    [self._in], [], [], max(0.0, deadline - time.monotonic())
                )
                if not ready:
                    raise TimeoutError(f"no answer to {method}")
                chunk = os.read(self._in, 1 << 16)
                if not chunk:
                    raise EOFError("Chromium closed its pipe")
                self._buffer += chunk
            raw, self._buffer = self._buffer.split(b"\0", 1)
            answer = json.loads(raw)
            if answer.get("id") == self._id:
                if "error" in answer:
                    raise RuntimeError(answer["error"])
                return answer["result"]

    def js(self, expression: str):
        """The value of a JavaScript expression in the page."""
        out = self.call(
            "Runtime.evaluate", self.session, expression=expression, returnByValue=True
        )
        if "exceptionDetails" in out:
            raise RuntimeError(out["exceptionDetails"])
        return out["result"].get("value")

    def wait_for(self, expression: str, timeout: float = 20.0):
        """Poll until the expression is truthy; its value."""
        deadline = time.monotonic() + timeout
        while time.monotonic() < deadline:
            try:
                value = self.js(expression)
            except RuntimeError:  # the page is still loading
                value = None
            if value:
                return value
            time.sleep(0.05)
        raise TimeoutError(f"{expression} stayed false")

    def screenshot(self, path) -> None:
        import base64

        data = self.call(
            "Page.captureScreenshot", self.session, format="png", captureBeyondViewport=True
        )["data"]
        with open(path, "wb") as f:
            f.write(base64.b64decode(data))

    def close(self) -> None:
        self.proc.kill()
        self.proc.wait(10)
        os.close(self._in)
        os.close(self._out)
