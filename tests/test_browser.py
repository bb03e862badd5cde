"""The HTML report in a real browser: headless Chromium driven over the
DevTools protocol by a tiny standard-library websocket client.

Loads the report from disk (file://), fails on any console error, page
exception, JavaScript dialog or network request, checks that hostile ligand
names come out as text (no script element, no dialog) and that a screenshot
is not blank.  Chromium comes from Debian's packages; the session fixture
installs it with apt-get when it is missing and we are root (CI), and FAILS
(never skips) when that is impossible.
"""

from __future__ import annotations

import base64
import io
import json
import os
import shutil
import socket
import struct
import subprocess
import time
import urllib.request

import pytest

from enumerator.isomers.enumeration import enumerate_isomers
from enumerator.model.composition import Composition, LigandKind
from enumerator.render.report import render_report
from enumerator.rules.ruleset import load_rules
from enumerator.workflow.pipeline import analyse
from enumerator.workflow.report import build_report
from enumerator.workflow.result import Result

HOSTILE = "<script>alert(1)</script>"
HOSTILE_DONOR = '"><img src=x onerror=alert(2)>'

FLAGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--disable-extensions",
    "--disable-default-apps",
    "--mute-audio",
    "--hide-scrollbars",
    "--window-size=1200,1600",
]


def _find_chromium() -> str | None:
    for name in ("chromium", "chromium-browser"):
        p = shutil.which(name)
        if p:
            return p
    return "/usr/bin/chromium" if os.path.exists("/usr/bin/chromium") else None


@pytest.fixture(scope="session")
def chromium() -> str:
    path = _find_chromium()
    if path:
        return path
    apt = shutil.which("apt-get")
    if not apt or os.geteuid() != 0:
        pytest.fail(
            "headless Chromium is needed for the browser test and is missing; "
            "install it with: apt-get install -y chromium chromium-driver (as root)"
        )
    env = dict(os.environ, DEBIAN_FRONTEND="noninteractive")
    log = []
    for cmd in ([apt, "update", "-q"], [apt, "install", "-y", "-q", "chromium", "chromium-driver"]):
        r = subprocess.run(cmd, env=env, capture_output=True, text=True, timeout=1500)
        log.append(r.stdout[-2000:] + r.stderr[-2000:])
        if r.returncode != 0:
            pytest.fail(f"installing Chromium failed ({' '.join(cmd)} exit {r.returncode}):\n{log[-1]}")
    path = _find_chromium()
    if not path:
        pytest.fail("apt-get reported success but no chromium binary was found:\n" + "\n".join(log))
    return path


# ----------------------------------------------------------- minimal websocket client (RFC 6455)
class WebSocket:
    def __init__(self, url: str, timeout: float = 30.0):
        assert url.startswith("ws://")
        hostport, _, path = url[5:].partition("/")
        host, _, port = hostport.partition(":")
        self.sock = socket.create_connection((host, int(port)), timeout=timeout)
        key = base64.b64encode(os.urandom(16)).decode()
        req = (
            f"GET /{path} HTTP/1.1\r\nHost: {hostport}\r\nUpgrade: websocket\r\nConnection: Upgrade\r\n"
            f"Sec-WebSocket-Key: {key}\r\nSec-WebSocket-Version: 13\r\n\r\n"
        )
        self.sock.sendall(req.encode())
        head = b""
        while b"\r\n\r\n" not in head:
            chunk = self.sock.recv(1)
            if not chunk:
                raise ConnectionError("websocket handshake failed")
            head += chunk
        if b" 101 " not in head.split(b"\r\n", 1)[0]:
            raise ConnectionError(head.decode(errors="replace"))

    def _recv_exact(self, n: int) -> bytes:
        buf = b""
        while len(buf) < n:
            chunk = self.sock.recv(n - len(buf))
            if not chunk:
                raise ConnectionError("websocket closed")
            buf += chunk
        return buf

    def send(self, text: str) -> None:
        data = text.encode()
        head = bytearray([0x81])
        n = len(data)
        if n < 126:
            head.append(0x80 | n)
        elif n < 65536:
            head.append(0x80 | 126)
            head += struct.pack(">H", n)
        else:
            head.append(0x80 | 127)
            head += struct.pack(">Q", n)
        mask = os.urandom(4)
        head += mask
        self.sock.sendall(bytes(head) + bytes(b ^ mask[i % 4] for i, b in enumerate(data)))

    def recv(self) -> str:
        parts = []
        while True:
            b1, b2 = self._recv_exact(2)
            n = b2 & 0x7F
            if n == 126:
                n = struct.unpack(">H", self._recv_exact(2))[0]
            elif n == 127:
                n = struct.unpack(">Q", self._recv_exact(8))[0]
            payload = self._recv_exact(n)
            opcode = b1 & 0x0F
            if opcode == 0x8:
                raise ConnectionError("websocket closed by the browser")
            if opcode in (0x9, 0xA):  # ping/pong: ignore
                continue
            parts.append(payload)
            if b1 & 0x80:
                return b"".join(parts).decode()

    def close(self) -> None:
        self.sock.close()


class DevTools:
    """Commands and collected events of one page target."""

    def __init__(self, ws: WebSocket):
        self.ws, self.next_id, self.events = ws, 0, []

    def call(self, method: str, **params):
        self.next_id += 1
        my = self.next_id
        self.ws.send(json.dumps({"id": my, "method": method, "params": params}))
        while True:
            msg = json.loads(self.ws.recv())
            if msg.get("id") == my:
                if "error" in msg:
                    raise RuntimeError(f"{method}: {msg['error']}")
                return msg.get("result", {})
            if "method" in msg:
                self.events.append(msg)

    def wait_for(self, method: str, timeout: float = 30.0) -> dict:
        end = time.time() + timeout
        for e in self.events:
            if e["method"] == method:
                return e
        while time.time() < end:
            msg = json.loads(self.ws.recv())
            if "method" in msg:
                self.events.append(msg)
                if msg["method"] == method:
                    return msg
        raise TimeoutError(method)


@pytest.fixture(scope="session")
def browser(chromium, tmp_path_factory):
    profile = tmp_path_factory.mktemp("chromium-profile")
    proc = subprocess.Popen(
        [chromium, *FLAGS, f"--user-data-dir={profile}", "--remote-debugging-port=0", "about:blank"],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    try:
        port_file = profile / "DevToolsActivePort"
        end = time.time() + 60
        while not (port_file.exists() and port_file.read_text().strip()) and time.time() < end:
            if proc.poll() is not None:
                pytest.fail(f"chromium exited with status {proc.returncode} at start-up")
            time.sleep(0.1)
        if not port_file.exists():
            pytest.fail("chromium did not open its DevTools port within 60 s")
        port = int(port_file.read_text().split()[0])
        targets = []
        while time.time() < end and not targets:
            with urllib.request.urlopen(f"http://127.0.0.1:{port}/json/list", timeout=10) as fh:
                targets = [t for t in json.load(fh) if t.get("type") == "page"]
            time.sleep(0.1)
        ws = WebSocket(targets[0]["webSocketDebuggerUrl"])
        yield DevTools(ws)
        ws.close()
    finally:
        proc.terminate()
        try:
            proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            proc.kill()


def _hostile_result() -> Result:
    """A composition whose ligand name and donor label are HTML/JS, as a user
    ligand file could supply them."""
    bad = LigandKind(HOSTILE, (HOSTILE_DONOR,), reporter="CO")
    other = LigandKind("b&amp;", ("b",))
    comp = Composition(f"M{HOSTILE}4b2", ((bad, 4), (other, 2)))
    geo = load_rules().geometry("OC-6")
    iso = enumerate_isomers(comp, geo)
    return Result(comp, geo, "OC-6 as requested", iso, notes=(f"note with {HOSTILE}",))


@pytest.fixture(scope="session")
def page(browser, tmp_path_factory):
    out = tmp_path_factory.mktemp("report") / "report.html"
    results = [analyse("[RuCl2(CO)2(PPh3)2]"), analyse("M(AA)2b2"), _hostile_result()]
    out.write_text(render_report(build_report(results, title=f"browser test {HOSTILE}")), encoding="utf-8")
    b = browser
    for domain in ("Page", "Runtime", "Log", "Network"):
        b.call(f"{domain}.enable")
    b.call("Page.navigate", url=out.as_uri())
    b.wait_for("Page.loadEventFired")
    return b


def test_no_console_errors_dialogs_or_network(page):
    problems = []
    for e in page.events:
        m, p = e["method"], e.get("params", {})
        if m == "Runtime.exceptionThrown":
            problems.append(p["exceptionDetails"].get("text"))
        elif m == "Runtime.consoleAPICalled" and p.get("type") in ("error", "assert"):
            problems.append(str(p.get("args")))
        elif m == "Log.entryAdded" and p["entry"].get("level") == "error":
            problems.append(p["entry"].get("text"))
        elif m == "Page.javascriptDialogOpening":
            problems.append("dialog: " + p.get("message", ""))
        elif m == "Network.requestWillBeSent":
            url = p["request"]["url"]
            if not url.startswith(("file:", "data:", "about:")):
                problems.append("network request: " + url)
    assert problems == []


def test_user_strings_are_text_not_markup(page):
    r = page.call(
        "Runtime.evaluate",
        returnByValue=True,
        expression=(
            "JSON.stringify({scripts: document.querySelectorAll('script').length,"
            " imgs_onerror: document.querySelectorAll('img[onerror]').length,"
            " text: document.body.innerText.includes('<script>alert(1)</script>'),"
            " title: document.title, svgs: document.querySelectorAll('svg').length,"
            " cards: document.querySelectorAll('.card').length})"
        ),
    )
    got = json.loads(r["result"]["value"])
    assert got["scripts"] == 0 and got["imgs_onerror"] == 0
    assert got["text"] and got["title"] == f"browser test {HOSTILE}"
    # [RuCl2(CO)2(PPh3)2]: 6 stereoisomers; M(AA)2b2: 3 (trans, cis pair); Ma4b2: 2 (common practice)
    assert got["cards"] == 6 + 3 + 2
    assert got["svgs"] >= got["cards"]


def test_screenshot_is_not_blank(page):
    import numpy as np
    from PIL import Image

    shot = page.call("Page.captureScreenshot", format="png")
    img = np.asarray(Image.open(io.BytesIO(base64.b64decode(shot["data"]))).convert("L"), dtype=float)
    assert img.shape[0] > 500 and img.shape[1] > 500
    assert img.std() > 10  # a blank page has std 0 (common practice threshold)
    assert (img < 128).mean() > 0.01  # at least 1 % dark pixels: text and drawings rendered
