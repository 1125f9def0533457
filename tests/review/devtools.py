"""Driving headless Chromium for the browser tests, with the standard library only.

Two ways: ``--dump-dom`` (the page's DOM after its scripts ran, printed on stdout) and the
Chrome DevTools protocol over ``--remote-debugging-port``, spoken through a minimal WebSocket
client (RFC 6455: the opening handshake, masked text frames out, unmasked frames in), so no
browser-automation package and no browser download is needed. The browser runs with a fresh
profile folder and with its background network features off.
"""

from __future__ import annotations

import base64
import json
import os
import shutil
import socket
import struct
import subprocess
import time
import urllib.request
from pathlib import Path

_LOCAL = urllib.request.build_opener(urllib.request.ProxyHandler({}))  # never through a proxy
BROWSER_NAMES = ("chromium", "chromium-browser")
QUIET_FLAGS = ("--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
               "--disable-background-networking", "--disable-component-update", "--disable-sync",
               "--hide-scrollbars", "--mute-audio")


def find_browser() -> str | None:
    for name in BROWSER_NAMES:
        found = shutil.which(name)
        if found:
            return found
    return "/usr/bin/chromium" if os.access("/usr/bin/chromium", os.X_OK) else None


def browser_command(browser: str, profile: Path, *extra: str) -> list[str]:
    return [browser, *QUIET_FLAGS, f"--user-data-dir={profile}", *extra]


def dump_dom(browser: str, profile: Path, url: str, timeout_s: float = 90.0) -> str:
    result = subprocess.run(browser_command(browser, profile, "--dump-dom", url), capture_output=True, text=True,
                            timeout=timeout_s, check=True)
    return result.stdout


def screenshot(browser: str, profile: Path, url: str, target: Path, size: str = "1200,1600",
               timeout_s: float = 90.0) -> None:
    subprocess.run(browser_command(browser, profile, f"--window-size={size}", f"--screenshot={target}", url),
                   capture_output=True, timeout=timeout_s, check=True)


class DevToolsPage:
    """One page of a browser started with a debugging port; ``call`` sends a protocol command."""

    def __init__(self, browser: str, profile: Path, url: str, size: str = "1200,1600") -> None:
        self.process = subprocess.Popen(
            browser_command(browser, profile, "--remote-debugging-port=0", "--remote-debugging-address=127.0.0.1",
                            f"--window-size={size}", url),
            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        self._next_id = 0
        try:
            port = self._port(profile)
            self._socket = self._connect(self._page_socket_url(port, url))
            # the target may still show about:blank while the file loads
            base = json.dumps(url.split("#")[0])
            self.wait_for(f"location.href.split('#')[0] === {base} && document.readyState === 'complete'", 60.0)
        except BaseException:
            self.close()
            raise

    def _port(self, profile: Path, timeout_s: float = 60.0) -> int:
        marker = profile / "DevToolsActivePort"
        deadline = time.monotonic() + timeout_s
        while time.monotonic() < deadline:
            if marker.exists() and marker.read_text().strip():
                return int(marker.read_text().split()[0])
            if self.process.poll() is not None:
                raise RuntimeError(f"the browser exited with code {self.process.returncode}")
            time.sleep(0.1)
        raise TimeoutError("the browser did not open its debugging port")

    @staticmethod
    def _page_socket_url(port: int, url: str, timeout_s: float = 60.0) -> str:
        deadline = time.monotonic() + timeout_s
        while time.monotonic() < deadline:
            with _LOCAL.open(f"http://127.0.0.1:{port}/json/list", timeout=10) as answer:
                pages = [t for t in json.load(answer) if t.get("type") == "page" and t.get("url", "").startswith(
                    url.split("#")[0])]
            if pages:
                return pages[0]["webSocketDebuggerUrl"]
            time.sleep(0.1)
        raise TimeoutError("the page did not appear among the browser's targets")

    @staticmethod
    def _connect(ws_url: str) -> socket.socket:
        host_port, _, path = ws_url.removeprefix("ws://").partition("/")
        host, _, port = host_port.partition(":")
        sock = socket.create_connection((host, int(port)), timeout=30)
        key = base64.b64encode(os.urandom(16)).decode()
        sock.sendall((f"GET /{path} HTTP/1.1\r\nHost: {host_port}\r\nUpgrade: websocket\r\nConnection: Upgrade\r\n"
                      f"Sec-WebSocket-Key: {key}\r\nSec-WebSocket-Version: 13\r\n\r\n").encode())
        head = b""
        while b"\r\n\r\n" not in head:
            chunk = sock.recv(1)
            if not chunk:
                raise ConnectionError("the browser closed the connection during the handshake")
            head += chunk
        if not head.startswith(b"HTTP/1.1 101"):
            raise ConnectionError(f"WebSocket handshake refused: {head.splitlines()[0]!r}")
        return sock

    def _send(self, text: str) -> None:
        payload = text.encode()
        mask = os.urandom(4)
        size = len(payload)
        if size < 126:
            header = struct.pack("!BB", 0x81, 0x80 | size)
        elif size < 1 << 16:
            header = struct.pack("!BBH", 0x81, 0x80 | 126, size)
        else:
            header = struct.pack("!BBQ", 0x81, 0x80 | 127, size)
        self._socket.sendall(header + mask + bytes(b ^ mask[i % 4] for i, b in enumerate(payload)))

    def _read_exactly(self, count: int) -> bytes:
        data = b""
        while len(data) < count:
            chunk = self._socket.recv(count - len(data))
            if not chunk:
                raise ConnectionError("the browser closed the connection")
            data += chunk
        return data

    def _receive(self) -> str:
        message = b""
        while True:
            first, second = self._read_exactly(2)
            size = second & 0x7F
            if size == 126:
                size = struct.unpack("!H", self._read_exactly(2))[0]
            elif size == 127:
                size = struct.unpack("!Q", self._read_exactly(8))[0]
            payload = self._read_exactly(size)
            if first & 0x0F in (0x1, 0x0):
                message += payload
                if first & 0x80:
                    return message.decode()

    def call(self, method: str, **params) -> dict:
        """Send one command and wait for its answer (events that arrive meanwhile are dropped)."""
        self._next_id += 1
        self._send(json.dumps({"id": self._next_id, "method": method, "params": params}))
        while True:
            answer = json.loads(self._receive())
            if answer.get("id") == self._next_id:
                if "error" in answer:
                    raise RuntimeError(f"{method}: {answer['error']}")
                return answer["result"]

    def evaluate(self, expression: str):
        result = self.call("Runtime.evaluate", expression=expression, returnByValue=True, awaitPromise=True)
        if "exceptionDetails" in result:
            raise RuntimeError(f"page script failed: {result['exceptionDetails']}")
        return result["result"].get("value")

    def wait_for(self, expression: str, timeout_s: float = 30.0) -> None:
        deadline = time.monotonic() + timeout_s
        while not self.evaluate(expression):
            if time.monotonic() > deadline:
                raise TimeoutError(f"never true in the page: {expression}")
            time.sleep(0.05)

    def click(self, x: float, y: float) -> None:
        """A real mouse click at page coordinates: press and release of the left button."""
        for kind in ("mousePressed", "mouseReleased"):
            self.call("Input.dispatchMouseEvent", type=kind, x=x, y=y, button="left", clickCount=1)

    def close(self) -> None:
        sock = getattr(self, "_socket", None)
        if sock is not None:
            sock.close()
        self.process.terminate()
        try:
            self.process.wait(timeout=20)
        except subprocess.TimeoutExpired:
            self.process.kill()
            self.process.wait(timeout=20)
