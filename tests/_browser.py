"""A page drawn by a real browser: Debian's headless Chromium (installed by .ci/run)."""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest


def screenshot(page: Path, folder: Path, width: int, height: int) -> np.ndarray:
    """The page as Chromium draws it in a window of width x height pixels, as an RGB int array;
    skips the test, naming chromium, when it is not installed."""
    browser = shutil.which("chromium") or shutil.which("chromium-browser")
    if not browser:
        pytest.skip("chromium is not installed (apt-get install chromium; .ci/run installs it)")
    shot = folder / f"{page.stem}.png"
    subprocess.run([browser, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                    "--disable-background-networking", "--disable-component-update", "--disable-sync",
                    f"--user-data-dir={folder / 'profile'}", "--hide-scrollbars", f"--window-size={width},{height}",
                    f"--screenshot={shot}", page.as_uri()],
                   check=True, capture_output=True, timeout=120)
    from PIL import Image

    return np.asarray(Image.open(shot).convert("RGB")).astype(int)
