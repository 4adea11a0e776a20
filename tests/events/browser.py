"""Headless Chromium helpers for the page tests: screenshot and console messages."""

from __future__ import annotations

import os
import re
import shutil
import subprocess
from pathlib import Path

HERE = Path(__file__).parent


def chromium_or_reason() -> tuple[str | None, str]:
    """(path to chromium, "") or (None, why it cannot be had)."""
    exe = shutil.which("chromium")
    if exe:
        return exe, ""
    try:
        r = subprocess.run(["bash", str(HERE / "install_chromium.sh")], capture_output=True,
                           text=True, timeout=900)
    except (OSError, subprocess.TimeoutExpired) as err:
        return None, f"could not run the Chromium set-up script: {err}"
    exe = shutil.which("chromium")
    if exe:
        return exe, ""
    return None, f"Chromium could not be installed with apt-get: {(r.stderr or r.stdout)[-300:]}"


def run_page(exe: str, page: Path, screenshot: Path, *, width: int = 1200,
             height: int = 2200) -> list[str]:
    """Load ``page`` headless, save a screenshot and return the console lines Chromium logged."""
    profile = screenshot.parent / f".chromium-{screenshot.stem}"
    cmd = [exe, "--headless=new", "--no-sandbox", "--disable-gpu", "--no-first-run",
           "--no-default-browser-check", "--disable-extensions", "--disable-background-networking",
           "--disable-component-update", "--disable-sync", "--hide-scrollbars",
           # offline always: no name resolves, no proxy or update traffic can leave the machine
           "--host-resolver-rules=MAP * ~NOTFOUND", "--no-proxy-server", "--no-pings",
           "--disable-domain-reliability", "--disable-client-side-phishing-detection",
           "--enable-logging=stderr", "--v=0", f"--user-data-dir={profile}",
           f"--window-size={width},{height}", f"--screenshot={screenshot}",
           "--virtual-time-budget=3000", page.resolve().as_uri()]
    env = dict(os.environ, HOME=str(screenshot.parent))
    r = subprocess.run(cmd, capture_output=True, text=True, timeout=180, env=env)
    if not screenshot.exists():
        raise RuntimeError(f"chromium made no screenshot (exit {r.returncode}): {r.stderr[-800:]}")
    return [line for line in r.stderr.splitlines() if re.search(r"CONSOLE|Uncaught|Refused to", line)]
