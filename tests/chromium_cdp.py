"""A small client of Chromium's DevTools protocol over a pipe, for the report tests.

Chromium (Debian's ``chromium``) is started headless with ``--remote-debugging-pipe``:
it reads JSON commands, each ended by a NUL byte, on its file descriptor 3 and writes
replies and events the same way on descriptor 4 (source: the Chrome DevTools Protocol,
https://chromedevtools.github.io/devtools-protocol/, "--remote-debugging-pipe").  A
shell ``exec`` maps our pipes onto those descriptors, so no websocket library is needed.

Every event is kept, so that a test can look for console errors, exceptions and
network requests after the page has loaded.
"""

from __future__ import annotations

import base64
import json
import os
import queue
import shutil
import subprocess
import threading
import time
from pathlib import Path

CHROMIUM = shutil.which("chromium") or (
    "/usr/bin/chromium" if os.access("/usr/bin/chromium", os.X_OK) else None)


def need_chromium() -> None:
    """Skip (fail under CI) when Chromium is not installed."""
    if CHROMIUM is None:
        from conftest import missing_tool

        missing_tool("Chromium is not installed: the report tests open the page in it "
                     "(.ci/run installs Debian's chromium)")

FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--disable-default-apps", "--disable-extensions", "--mute-audio", "--hide-scrollbars",
         "--font-render-hinting=none"]


class CDPError(RuntimeError):
    """A command that Chromium answered with an error, or no answer in time."""


class Browser:
    """One headless Chromium and one page in it, driven by DevTools commands.

    Use as a context manager; :meth:`open` loads a file, :meth:`evaluate` runs
    JavaScript in it, :meth:`screenshot` and :meth:`pdf` give PNG and PDF bytes.
    """

    def __init__(self, profile: Path, *, width: int = 1280, height: int = 900, timeout: float = 60.0):
        self.timeout = timeout
        cmd = ["sh", "-c", 'exec "$0" "$@" 3<&0 4>&1 0</dev/null 1>/dev/null', CHROMIUM, *FLAGS,
               f"--user-data-dir={profile}", "--remote-debugging-pipe", "about:blank"]
        self.proc = subprocess.Popen(cmd, stdin=subprocess.PIPE, stdout=subprocess.PIPE,
                                     stderr=subprocess.DEVNULL)
        self._next = 0
        self._inbox: queue.Queue = queue.Queue()
        self.events: list[dict] = []
        self._reader = threading.Thread(target=self._read, daemon=True)
        self._reader.start()
        target = self.send("Target.createTarget", {"url": "about:blank"})["targetId"]
        self.session = self.send("Target.attachToTarget", {"targetId": target, "flatten": True})["sessionId"]
        for domain in ("Page", "Runtime", "Log", "Network"):
            self.send(f"{domain}.enable", session=True)
        self.send("Emulation.setDeviceMetricsOverride",
                  {"width": width, "height": height, "deviceScaleFactor": 1, "mobile": False}, session=True)

    # ------------------------------------------------------------------ plumbing

    def _read(self) -> None:
        buf = b""
        out = self.proc.stdout
        while True:
            chunk = os.read(out.fileno(), 1 << 16)
            if not chunk:
                self._inbox.put(None)
                return
            buf += chunk
            while b"\0" in buf:
                msg, buf = buf.split(b"\0", 1)
                self._inbox.put(json.loads(msg))

    def _pump(self, until, timeout: float):
        end = time.monotonic() + timeout
        while True:
            left = end - time.monotonic()
            if left <= 0:
                raise CDPError("no answer from Chromium in time")
            try:
                msg = self._inbox.get(timeout=left)
            except queue.Empty:
                raise CDPError("no answer from Chromium in time") from None
            if msg is None:
                raise CDPError("Chromium closed the pipe")
            if "id" not in msg:
                self.events.append(msg)
            found = until(msg)
            if found is not None:
                return found

    def send(self, method: str, params: dict | None = None, *, session: bool = False, timeout: float | None = None):
        """Send a command and wait for its reply; events meanwhile are kept in :attr:`events`."""
        self._next += 1
        ident = self._next
        msg = {"id": ident, "method": method, "params": params or {}}
        if session:
            msg["sessionId"] = self.session
        self.proc.stdin.write(json.dumps(msg).encode() + b"\0")
        self.proc.stdin.flush()

        def reply(m):
            if m.get("id") == ident:
                if "error" in m:
                    raise CDPError(f"{method}: {m['error']}")
                return m.get("result", {})
            return None

        return self._pump(reply, timeout or self.timeout)

    def wait_event(self, method: str, timeout: float | None = None) -> dict:
        """Wait for the next event ``method`` of the page (or return one already seen)."""
        for e in self.events:
            if e.get("method") == method and not e.get("_seen"):
                e["_seen"] = True
                return e
        return self._pump(lambda m: m if m.get("method") == method else None, timeout or self.timeout)

    # ------------------------------------------------------------------ the page

    def open(self, path: Path) -> None:
        """Load ``path`` and wait for its load event."""
        self.events.clear()
        self.send("Page.navigate", {"url": Path(path).resolve().as_uri()}, session=True)
        self.wait_event("Page.loadEventFired")

    def evaluate(self, expression: str):
        """The value of a JavaScript expression in the page (JSON-able)."""
        res = self.send("Runtime.evaluate", {"expression": expression, "returnByValue": True,
                                             "awaitPromise": True}, session=True)
        if "exceptionDetails" in res:
            raise CDPError(f"JavaScript failed: {res['exceptionDetails']}")
        return res["result"].get("value")

    def screenshot(self) -> bytes:
        """A PNG of the whole page, beyond the window's height."""
        metrics = self.send("Page.getLayoutMetrics", session=True)["cssContentSize"]
        clip = {"x": 0, "y": 0, "width": metrics["width"], "height": min(metrics["height"], 12000), "scale": 1}
        data = self.send("Page.captureScreenshot", {"format": "png", "clip": clip, "captureBeyondViewport": True},
                         session=True)["data"]
        return base64.b64decode(data)

    def pdf(self, paper_width_in: float, paper_height_in: float) -> bytes:
        """The page printed to PDF on paper of the size given [in], the page's own margins."""
        data = self.send("Page.printToPDF", {"paperWidth": paper_width_in, "paperHeight": paper_height_in,
                                             "printBackground": True, "preferCSSPageSize": False},
                         session=True, timeout=120)["data"]
        return base64.b64decode(data)

    # ------------------------------------------------------------------ what happened

    def console_errors(self) -> list[str]:
        """Console errors, uncaught exceptions and error log entries since the page was opened."""
        out = []
        for e in self.events:
            m, p = e.get("method"), e.get("params", {})
            if m == "Runtime.consoleAPICalled" and p.get("type") in ("error", "assert", "warning"):
                out.append(" ".join(str(a.get("value", a.get("description", ""))) for a in p.get("args", [])))
            elif m == "Runtime.exceptionThrown":
                out.append(str(p.get("exceptionDetails", {}).get("text")))
            elif m == "Log.entryAdded" and p.get("entry", {}).get("level") in ("error", "warning"):
                out.append(p["entry"].get("text", ""))
        return out

    def requests(self) -> list[str]:
        """URLs of every request the page made since it was opened."""
        return [e["params"]["request"]["url"] for e in self.events if e.get("method") == "Network.requestWillBeSent"]

    def close(self) -> None:
        try:
            self.send("Browser.close", timeout=10)
        except CDPError:
            pass
        try:
            self.proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            self.proc.kill()
            self.proc.wait()

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()
