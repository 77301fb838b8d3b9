"""The run report: the workflow and ``snakemake --report`` on a small invented catalogue, opened in
headless Chromium, which must render the report's front page and show every figure.

Chromium (Debian package ``chromium``, /usr/bin/chromium) is driven through the DevTools protocol
over ``--remote-debugging-pipe`` (file descriptors 3 and 4, NUL-terminated JSON): the test clicks
through the report like a reader would (category "Figures", the eye button of each figure) and
asks the browser whether the image decoded. Without Chromium the test is skipped.

Set CINDERCLOCK_REPORT_SHOTS to a folder to keep the screenshots for a look by eye.
"""

from __future__ import annotations

import base64
import json
import os
import re
import shutil
import subprocess
import sys
import time
from pathlib import Path

import pytest
import yaml

from cinderclock.simulate import make_catalogue, write_csv

ROOT = Path(__file__).resolve().parents[1]
FIGURES = ("colour_magnitude", "mass_distribution", "age_distributions", "luminosity_function", "age_fit",
           "star_formation_history")


def chromium_path():
    for name in ("chromium", "chromium-browser"):
        found = shutil.which(name)
        if found:
            return found
    return "/usr/bin/chromium" if os.path.exists("/usr/bin/chromium") else None


class DevToolsPipe:
    """Minimal Chrome DevTools Protocol client over --remote-debugging-pipe (standard library only)."""

    def __init__(self, exe, profile_dir, timeout=60.0):
        cmd_r, cmd_w = os.pipe()          # we write -> browser reads on fd 3
        out_r, out_w = os.pipe()          # browser writes on fd 4 -> we read

        def child_fds():
            os.dup2(cmd_r, 3)
            os.dup2(out_w, 4)

        args = [exe, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                "--disable-background-networking", "--disable-component-update", "--disable-sync",
                "--disable-extensions", f"--user-data-dir={profile_dir}", "--remote-debugging-pipe",
                "--window-size=1400,1000", "about:blank"]
        self.proc = subprocess.Popen(args, preexec_fn=child_fds, pass_fds=(3, 4), stdout=subprocess.DEVNULL,
                                     stderr=subprocess.DEVNULL)
        os.close(cmd_r)
        os.close(out_w)
        self._w = os.fdopen(cmd_w, "wb", buffering=0)
        self._r = os.fdopen(out_r, "rb", buffering=0)
        self._buf = b""
        self._id = 0
        self.timeout = timeout

    def _message(self):
        import select

        while b"\0" not in self._buf:
            ready, _, _ = select.select([self._r], [], [], self.timeout)
            if not ready:
                raise RuntimeError(f"no answer from the browser within {self.timeout} s")
            chunk = self._r.read(1 << 16)
            if not chunk:
                raise RuntimeError("the browser closed its DevTools pipe")
            self._buf += chunk
        raw, _, self._buf = self._buf.partition(b"\0")
        return json.loads(raw)

    def call(self, method, params=None, session=None):
        self._id += 1
        msg = {"id": self._id, "method": method, "params": params or {}}
        if session:
            msg["sessionId"] = session
        self._w.write(json.dumps(msg).encode() + b"\0")
        while True:
            reply = self._message()
            if reply.get("id") == self._id:
                if "error" in reply:
                    raise RuntimeError(f"{method}: {reply['error']}")
                return reply["result"]

    def close(self):
        try:
            self.call("Browser.close")
        except (RuntimeError, OSError):
            pass
        try:
            self.proc.wait(timeout=15)
        except subprocess.TimeoutExpired:
            self.proc.kill()
            self.proc.wait()


class Page:
    def __init__(self, browser, url):
        self.b = browser
        target = browser.call("Target.createTarget", {"url": url})["targetId"]
        self.session = browser.call("Target.attachToTarget", {"targetId": target, "flatten": True})["sessionId"]

    def js(self, expression):
        r = self.b.call("Runtime.evaluate", {"expression": expression, "returnByValue": True, "awaitPromise": True},
                        self.session)
        if "exceptionDetails" in r:
            raise RuntimeError(f"script error: {r['exceptionDetails'].get('text')}")
        return r["result"].get("value")

    def wait_for(self, expression, timeout=30.0):
        end = time.monotonic() + timeout
        while time.monotonic() < end:
            if self.js(expression):
                return True
            time.sleep(0.1)
        return False

    def screenshot(self, path):
        data = self.b.call("Page.captureScreenshot", {"format": "png"}, self.session)["data"]
        Path(path).write_bytes(base64.b64decode(data))
        return Path(path)


def snakemake(workdir, *args):
    cmd = [sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(workdir), "--cores", "2", *args]
    # the package next to this Snakefile, whichever copy is installed
    path = os.pathsep.join(p for p in (str(ROOT / "workflow"), os.environ.get("PYTHONPATH", "")) if p)
    env = dict(os.environ, OMP_NUM_THREADS="1", PYTHONPATH=path)
    return subprocess.run(cmd, capture_output=True, text=True, timeout=900, env=env)


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    wd = tmp_path_factory.mktemp("report")
    cat, _ = make_catalogue(600, seed=23)
    write_csv(cat, wd / "catalogue.csv")
    with open(ROOT / "config" / "config.yaml") as fh:
        cfg = yaml.safe_load(fh)
    cfg["catalogue"]["path"] = "catalogue.csv"
    cfg["population"]["bootstrap"]["resamples"] = 50
    (wd / "config").mkdir()
    (wd / "config" / "config.yaml").write_text(yaml.safe_dump(cfg))
    run = snakemake(wd)
    assert run.returncode == 0, run.stderr[-3000:]
    out = snakemake(wd, "--report", "report.html")
    assert out.returncode == 0, out.stderr[-3000:]
    return wd


def test_report_file_holds_figures_and_summary(report):
    # the report is one self-contained HTML file with every figure and the run summary embedded
    text = (report / "report.html").read_text()
    for name in FIGURES:
        assert f"{name}.png" in text
    assert "run_summary.html" in text
    assert len(re.findall(r"data:image/png[^,\"]*;base64,", text)) >= len(FIGURES)
    counts = json.loads((report / "results/final/stage_counts.json").read_text())
    summary = (report / "results/report/run_summary.html").read_text()
    assert f"<td class=\"num\">{counts['rows_read']}</td>" in summary
    assert "Potekhin" in summary and "PRE 62, 8554" in summary and "Schmidt, M. 1968" in summary


@pytest.mark.skipif(chromium_path() is None and not os.environ.get("CINDERCLOCK_REQUIRE_CHROMIUM"),
                    reason="Chromium is not installed (Debian: apt-get install -y chromium)")
def test_report_renders_in_headless_chromium(report, tmp_path):
    import matplotlib.image as mpimg

    shots = Path(os.environ.get("CINDERCLOCK_REPORT_SHOTS", tmp_path))
    shots.mkdir(parents=True, exist_ok=True)
    browser = DevToolsPipe(chromium_path(), tmp_path / "profile")
    try:
        page = Page(browser, (report / "report.html").as_uri())
        assert page.wait_for("document.readyState === 'complete' && typeof results === 'object' && "
                             "document.body.innerText.includes('cinderclock run')"), "front page did not render"
        front = page.js("document.body.innerText")
        assert "Figures" in front and "Run summary" in front
        landing = page.screenshot(shots / "report_front.png")

        keys = page.js("Object.keys(results)")
        assert sorted(k.rsplit("/", 1)[-1] for k in keys if k.endswith(".png")) == sorted(f"{n}.png" for n in FIGURES)
        summary_key = next(k for k in keys if k.endswith("run_summary.html"))
        decoded = page.js(f"atob(results[{json.dumps(summary_key)}].data_uri.split(',')[1])")
        assert "Stage counts" in decoded and "Population age" in decoded

        # like a reader: open the category, then view each figure with its eye button
        assert page.js("""(() => { const a = [...document.querySelectorAll('a')]
                               .find(e => e.textContent.trim() === 'Figures'); if (!a) return false;
                               a.click(); return true; })()""")
        for name in FIGURES:
            clicked = page.js(f"""(() => {{ const td = [...document.querySelectorAll('td')]
                    .find(e => e.textContent.trim().endsWith('/{name}.png'));
                  if (!td) return false; const eye = td.parentElement.querySelector('a[iconname="eye"]');
                  if (!eye) return false; eye.click(); return true; }})()""")
            assert clicked, f"no view button for {name}"
            assert page.wait_for(f"""(() => {{ const img = document.querySelector('img[src^="data:image/png"]');
                    return !!img && img.complete && img.naturalWidth > 500 &&
                           img.src === results[Object.keys(results).find(k => k.endsWith('/{name}.png'))].data_uri;
                    }})()"""), f"{name} did not display"
            shot = page.screenshot(shots / f"report_{name}.png")
            pixels = mpimg.imread(shot)
            assert pixels[..., :3].std() > 0.05, f"{name}: blank screenshot"
        assert mpimg.imread(landing)[..., :3].std() > 0.05
    finally:
        browser.close()
