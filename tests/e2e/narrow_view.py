#!/usr/bin/env python3
"""narrow_view.py - a page as a narrow screen shows it, measured in the browser.

Headless Chromium will not make a window narrower than 500 px, so the width
is set through the DevTools protocol (Emulation.setDeviceMetricsOverride)
over --remote-debugging-pipe (messages are JSON texts ended by a NUL byte,
the browser reads fd 3 and writes fd 4). The page is loaded at WIDTH x
HEIGHT CSS px; a script run in it (the report itself has none) prints

  viewport=<clientWidth> scroll=<documentElement.scrollWidth>
  body=<body.scrollWidth> table=<right edge of table.ranking>
  cells=<largest right edge of the caption, any body row, cell, code or
        link of the ranking>

and a PNG of the first HEIGHT px is written to PNG.

Usage: narrow_view.py BROWSER URL WIDTH HEIGHT PNG PROFILE_DIR
Standard library only.
"""
import base64
import fcntl
import json
import os
import subprocess
import sys

MEASURE = r"""(function () {
  var d = document.documentElement, t = document.querySelector("table.ranking"), m = 0;
  /* the visible rows (the header row is hidden in a 1 px box on narrow screens) */
  document.querySelectorAll("table.ranking caption, table.ranking tbody tr, table.ranking tbody td, "
      + "table.ranking tbody th, table.ranking tbody code, table.ranking tbody a")
    .forEach(function (e) { m = Math.max(m, e.getBoundingClientRect().right); });
  /* the innermost element reaching past the viewport, named for the failure message */
  var wide = "none";
  document.querySelectorAll("body *").forEach(function (e) {
    if (e.getBoundingClientRect().right > d.clientWidth + 0.5 && !e.querySelector("*"))
      wide = e.tagName.toLowerCase() + (e.className && e.className.baseVal === undefined ? "." + e.className : "")
        + ":" + JSON.stringify((e.textContent || "").slice(0, 60));
  });
  return "viewport=" + d.clientWidth + " scroll=" + d.scrollWidth + " body=" + document.body.scrollWidth +
    " table=" + (t ? Math.ceil(t.getBoundingClientRect().right) : -1) + " cells=" + Math.ceil(m) +
    " widest=" + wide;
})()"""


def main():
    browser, url, width, height, png, profile = sys.argv[1:7]
    width, height = int(width), int(height)
    to_r, to_w = os.pipe()      # we write, the browser reads (its fd 3)
    from_r, from_w = os.pipe()  # the browser writes (its fd 4), we read
    # Above 9, so that the dup2 to 3 and 4 below never meets itself (a pipe
    # end already on 3 or 4 would keep its close-on-exec flag).
    hi_r, hi_w = fcntl.fcntl(to_r, fcntl.F_DUPFD_CLOEXEC, 10), fcntl.fcntl(from_w, fcntl.F_DUPFD_CLOEXEC, 10)

    def child_fds():
        os.dup2(hi_r, 3)
        os.dup2(hi_w, 4)

    args = [browser, "--headless", "--disable-gpu", "--disable-dev-shm-usage", "--no-first-run",
            "--disable-extensions", "--disable-background-networking", "--hide-scrollbars",
            "--remote-debugging-pipe", "--user-data-dir=" + profile]
    if os.getuid() == 0:
        args.append("--no-sandbox")
    proc = subprocess.Popen(args + ["about:blank"], preexec_fn=child_fds, close_fds=False,
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    for fd in (to_r, from_w, hi_r, hi_w):
        os.close(fd)
    out = os.fdopen(to_w, "wb")
    inp = os.fdopen(from_r, "rb")
    buf = b""
    next_id = [0]

    def read_message():
        nonlocal buf
        while b"\0" not in buf:
            chunk = inp.read1(65536)
            if not chunk:
                raise RuntimeError("the browser closed the pipe")
            buf += chunk
        msg, buf = buf.split(b"\0", 1)
        return json.loads(msg)

    def send(method, params=None, session=None, wait_event=None):
        next_id[0] += 1
        mid = next_id[0]
        m = {"id": mid, "method": method, "params": params or {}}
        if session:
            m["sessionId"] = session
        out.write(json.dumps(m).encode() + b"\0")
        out.flush()
        result, seen = None, wait_event is None
        while result is None or not seen:
            r = read_message()
            if r.get("id") == mid:
                if "error" in r:
                    raise RuntimeError("%s: %s" % (method, r["error"]))
                result = r["result"]
            elif wait_event and r.get("method") == wait_event:
                seen = True
        return result

    try:
        target = send("Target.createTarget", {"url": "about:blank"})["targetId"]
        session = send("Target.attachToTarget", {"targetId": target, "flatten": True})["sessionId"]
        send("Page.enable", session=session)
        send("Emulation.setDeviceMetricsOverride",
             {"width": width, "height": height, "deviceScaleFactor": 1, "mobile": False}, session=session)
        send("Page.navigate", {"url": url}, session=session, wait_event="Page.loadEventFired")
        value = send("Runtime.evaluate", {"expression": MEASURE, "returnByValue": True},
                     session=session)["result"]["value"]
        shot = send("Page.captureScreenshot", {"format": "png"}, session=session)["data"]
        with open(png, "wb") as f:
            f.write(base64.b64decode(shot))
        print(value)
        send("Browser.close")
    finally:
        try:
            proc.wait(timeout=20)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait()
    return 0


if __name__ == "__main__":
    sys.exit(main())
