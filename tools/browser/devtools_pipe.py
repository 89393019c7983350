"""One headless Chromium driven over the DevTools protocol on a pipe (--remote-debugging-pipe).

The pipe, not --enable-logging: Chromium's log prints every console message as INFO whatever its
level and says nothing of resources that fail to load, while the protocol reports console calls
with their level, uncaught exceptions and the browser's own error entries (failed loads, blocked
content). No port is opened and no package beyond the standard library is needed.
"""

import json
import os
import select
import signal
import subprocess
import time


class BrowserError(Exception):
    """Chromium could not be started, crashed, timed out or refused a command."""


class Browser:
    """A Chromium process with one page attached; use as a context manager.

    Every wait is bounded by `deadline_s` from the start, so a hung browser can never hang the
    caller; on exit the whole process group is killed, leaving no renderer behind.
    """

    def __init__(self, executable, user_data_dir, log_path, deadline_s=60.0, extra_args=()):
        self.deadline = time.monotonic() + deadline_s
        self.events = []        # every protocol event seen, in order: (method, params)
        self._next_id = 0
        self._buffer = b""
        to_browser_r, self._to_browser = os.pipe()
        self._from_browser, from_browser_w = os.pipe()

        def wire_pipe_fds():   # runs in the child: the protocol's fds are 3 (in) and 4 (out)
            a, b = os.dup(to_browser_r), os.dup(from_browser_w)
            os.dup2(a, 3)
            os.dup2(b, 4)

        args = [executable, "--headless", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage",
                "--remote-debugging-pipe", "--user-data-dir=" + user_data_dir,
                "--no-first-run", "--no-default-browser-check", "--disable-extensions",
                "--disable-background-networking", "--disable-component-update", "--mute-audio",
                "--hide-scrollbars",
                *extra_args, "about:blank"]
        # Its chatter (D-Bus, GPU) goes to a file: a pipe nobody reads could fill up and stall it.
        self._log_path = log_path
        self._log = open(log_path, "wb")
        try:
            self._proc = subprocess.Popen(args, stdin=subprocess.DEVNULL, stdout=self._log,
                                          stderr=self._log, pass_fds=(3, 4),
                                          preexec_fn=wire_pipe_fds, start_new_session=True)
        except OSError as e:
            self._log.close()
            raise BrowserError(f"cannot start {executable}: {e}") from e
        finally:
            os.close(to_browser_r)
            os.close(from_browser_w)
        self.session = None

    def __enter__(self):
        try:
            target = self.call("Target.createTarget", {"url": "about:blank"})["targetId"]
            self.session = self.call("Target.attachToTarget", {"targetId": target, "flatten": True})["sessionId"]
        except BaseException:
            self.close()
            raise
        return self

    def __exit__(self, *exc):
        self.close()

    def close(self):
        if self._proc.poll() is None:
            try:
                self._send({"id": self._new_id(), "method": "Browser.close"})
                self._proc.wait(timeout=5)
            except (OSError, subprocess.TimeoutExpired):
                pass
        try:
            os.killpg(self._proc.pid, signal.SIGKILL)   # the group started above: our own processes
        except ProcessLookupError:
            pass
        self._proc.wait()
        for fd in (self._to_browser, self._from_browser):
            try:
                os.close(fd)
            except OSError:
                pass
        self._log.close()

    def _new_id(self):
        self._next_id += 1
        return self._next_id

    def _send(self, message):
        os.write(self._to_browser, json.dumps(message).encode() + b"\0")

    def _receive(self):
        """The next message from the browser, waiting at most until the deadline."""
        while b"\0" not in self._buffer:
            left = self.deadline - time.monotonic()
            if left <= 0:
                raise BrowserError("chromium did not answer within the time limit")
            ready, _, _ = select.select([self._from_browser], [], [], left)
            if not ready:
                continue
            chunk = os.read(self._from_browser, 1 << 20)
            if not chunk:
                raise BrowserError("chromium closed the DevTools pipe (crashed or refused to start): " +
                                   self._log_tail())
            self._buffer += chunk
        raw, self._buffer = self._buffer.split(b"\0", 1)
        return json.loads(raw)

    def _log_tail(self):
        self._log.flush()
        with open(self._log_path, "rb") as f:
            return "last lines of its log " + str(self._log_path) + ":\n" + f.read()[-2000:].decode(errors="replace")

    def _record(self, message):
        if "method" in message:
            self.events.append((message["method"], message.get("params", {})))
            if message["method"] in ("Inspector.targetCrashed", "Target.targetCrashed"):
                raise BrowserError("the page crashed")

    def call(self, method, params=None, session=True):
        """Sends one command (to the page when attached) and returns its result."""
        message = {"id": self._new_id(), "method": method, "params": params or {}}
        if session and self.session:
            message["sessionId"] = self.session
        self._send(message)
        while True:
            reply = self._receive()
            if reply.get("id") == message["id"]:
                if "error" in reply:
                    raise BrowserError(f"{method}: {reply['error'].get('message')}")
                return reply.get("result", {})
            self._record(reply)

    def wait_for(self, method):
        """Waits until an event named `method` arrives (or was already seen since the last call)."""
        for name, params in self.events:
            if name == method:
                return params
        while True:
            reply = self._receive()
            self._record(reply)
            if reply.get("method") == method:
                return reply.get("params", {})

    def settle(self, seconds):
        """Collects events for a short while: messages logged just after the load event."""
        until = min(time.monotonic() + seconds, self.deadline)
        while time.monotonic() < until:
            ready, _, _ = select.select([self._from_browser], [], [], max(0.0, until - time.monotonic()))
            if not ready:
                break
            chunk = os.read(self._from_browser, 1 << 20)
            if not chunk:
                raise BrowserError("chromium closed the DevTools pipe: " + self._log_tail())
            self._buffer += chunk
            while b"\0" in self._buffer:
                raw, self._buffer = self._buffer.split(b"\0", 1)
                self._record(json.loads(raw))
