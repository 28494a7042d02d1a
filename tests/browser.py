"""A real headless browser for the report tests: Debian's chromium, driven over its DevTools
protocol (websocket-client), so a test sees what a person would: the headings the page
renders, whether each picture decodes, and every console message or page error.

The flags are those that work on a closed network: no background connections, no sandbox
(the tests may run as root), a fresh profile each start.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import tempfile
import time
import urllib.request
from pathlib import Path

FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--remote-debugging-port=0", "--remote-allow-origins=*", "--hide-scrollbars"]

#: what the page reports about itself once loaded
_PROBE = """JSON.stringify({
  title: document.title,
  headings: Array.from(document.querySelectorAll('h1, h2')).map(h => h.textContent),
  visible: Array.from(document.querySelectorAll('h1, h2')).every(h => h.getBoundingClientRect().height > 0),
  images: Array.from(document.images).map(i => ({complete: i.complete, width: i.naturalWidth,
                                                 height: i.naturalHeight})),
  external: Array.from(document.querySelectorAll('[src],[href]')).map(e => e.getAttribute('src') || e.getAttribute('href'))
            .filter(u => !u.startsWith('data:') && !u.startsWith('#') && !/^[^:]+\\.html$/.test(u)),
  height: document.documentElement.scrollHeight,
})"""


def find_browser() -> str | None:
    """The chromium executable (``TAUMATCH_BROWSER`` overrides), or None."""
    override = os.environ.get("TAUMATCH_BROWSER")
    if override:
        return override
    for name in ("chromium", "chromium-browser"):
        path = shutil.which(name)
        if path:
            return path
    return None


class Browser:
    """One headless chromium; :meth:`load` opens a page and returns what it saw."""

    def __init__(self, executable: str, timeout: float = 30.0):
        import websocket  # websocket-client

        self.timeout = timeout
        self.profile = tempfile.mkdtemp(prefix="taumatch-browser-")
        self.proc = subprocess.Popen([executable, *FLAGS, f"--user-data-dir={self.profile}",
                                      "about:blank"], stdout=subprocess.DEVNULL,
                                     stderr=subprocess.DEVNULL)
        port = self._port()
        pages = self._get(f"http://127.0.0.1:{port}/json/list")
        page = next(p for p in pages if p.get("type") == "page")
        self.ws = websocket.create_connection(page["webSocketDebuggerUrl"], timeout=timeout,
                                              suppress_origin=True)
        self._id = 0

    def _port(self) -> int:
        marker = Path(self.profile) / "DevToolsActivePort"
        deadline = time.monotonic() + self.timeout
        while time.monotonic() < deadline:
            if self.proc.poll() is not None:
                raise RuntimeError(f"chromium exited with status {self.proc.returncode}")
            if marker.exists():
                text = marker.read_text().split()
                if text:
                    return int(text[0])
            time.sleep(0.05)
        raise RuntimeError("chromium did not open its DevTools port")

    def _get(self, url):
        deadline = time.monotonic() + self.timeout
        while True:
            try:
                with urllib.request.urlopen(url, timeout=5) as r:
                    return json.loads(r.read())
            except OSError:
                if time.monotonic() > deadline:
                    raise
                time.sleep(0.1)

    def _send(self, method, **params) -> int:
        self._id += 1
        self.ws.send(json.dumps({"id": self._id, "method": method, "params": params}))
        return self._id

    def _call(self, method, events, **params):
        """Send a command and wait for its answer; events met on the way go to ``events``."""
        want = self._send(method, **params)
        while True:
            msg = json.loads(self.ws.recv())
            if msg.get("id") == want:
                if "error" in msg:
                    raise RuntimeError(f"{method}: {msg['error']}")
                return msg.get("result", {})
            if "method" in msg:
                events.append(msg)

    def load(self, path, screenshot: Path | None = None, width: int = 1100) -> dict:
        """Open ``path``; return its title, headings, images, external references and the
        console messages, page errors and log entries seen while it loaded."""
        events = []
        for domain in ("Page", "Runtime", "Log"):
            self._call(f"{domain}.enable", events)
        self._call("Emulation.setDeviceMetricsOverride", events, width=width, height=900,
                   deviceScaleFactor=1, mobile=False)
        self._call("Page.navigate", events, url=Path(path).resolve().as_uri())
        deadline = time.monotonic() + self.timeout
        while not any(e["method"] == "Page.loadEventFired" for e in events):
            if time.monotonic() > deadline:
                raise RuntimeError(f"{path}: the page did not finish loading")
            events.append(json.loads(self.ws.recv()))
        res = self._call("Runtime.evaluate", events, expression=_PROBE, returnByValue=True)
        seen = json.loads(res["result"]["value"])
        if screenshot is not None:
            import base64

            self._call("Emulation.setDeviceMetricsOverride", events, width=width,
                       height=min(seen["height"], 16000), deviceScaleFactor=1, mobile=False)
            shot = self._call("Page.captureScreenshot", events, format="png")
            Path(screenshot).write_bytes(base64.b64decode(shot["data"]))
        seen["console"] = [e["params"] for e in events if e["method"] in (
            "Runtime.consoleAPICalled", "Runtime.exceptionThrown", "Log.entryAdded")]
        return seen

    def close(self):
        try:
            self.ws.close()
        finally:
            self.proc.terminate()
            try:
                self.proc.wait(timeout=10)
            except subprocess.TimeoutExpired:
                self.proc.kill()
                self.proc.wait()
            shutil.rmtree(self.profile, ignore_errors=True)
