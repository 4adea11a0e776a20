"""The broken-scene corpus: every file is refused with a located one-line error, never a traceback.

Each file marks the line its error must name with ``# <-- error`` (``+1``: the
line after, where YAML reports an unclosed bracket); ``# error-in: F`` on line
1 says the error is located in the included file F instead.
"""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

import pytest

from domegen.cli.main import main
from domegen.errors import SceneError
from domegen.scene import load_scene

BROKEN = Path(__file__).parent / "broken"
FILES = sorted(BROKEN.glob("*.yaml"))


def expected_location(path: Path) -> tuple[str, int]:
    text = path.read_text(encoding="utf-8", errors="replace")
    m = re.match(r"# error-in: (\S+)", text)
    target = BROKEN / m.group(1) if m else path
    for i, line in enumerate(target.read_text(encoding="utf-8", errors="replace").splitlines(), 1):
        mark = re.search(r"# <-- error(\+1)?", line)
        if mark:
            return target.name, i + (1 if mark.group(1) else 0)
    raise AssertionError(f"{path.name} has no '# <-- error' marker")


def test_corpus_is_large_enough():
    assert len(FILES) >= 30


@pytest.mark.parametrize("path", FILES, ids=lambda p: p.stem)
def test_broken_scene_gives_exit_2_with_file_and_line(path, capsys, monkeypatch):
    monkeypatch.chdir(BROKEN)
    with pytest.raises(SceneError) as err:
        load_scene(path.name)
    name, line = expected_location(path)
    assert err.value.file is not None and Path(err.value.file).name == name
    assert err.value.line == line, str(err.value)
    assert err.value.column is not None and err.value.column >= 1
    code = main(["check", path.name])
    out = capsys.readouterr()
    assert code == 2
    assert re.search(rf"{re.escape(name)}:{line}:\d+:", out.err), out.err
    assert "Traceback" not in out.err and out.err.count("\n") == 1


def test_misspelt_keys_get_a_suggestion(capsys, monkeypatch):
    monkeypatch.chdir(BROKEN)
    for name, word in (("unknown-top-key", "shots"), ("misspelt-venue-key", "latitude"),
                       ("bad-easing", "ease_in")):
        assert main(["check", f"{name}.yaml"]) == 2
        assert f"did you mean '{word}'?" in capsys.readouterr().err


def test_python_tags_never_run(tmp_path, monkeypatch):
    """A YAML tag asking for object construction is refused, and nothing executes."""
    monkeypatch.chdir(tmp_path)
    canary = tmp_path / "canary"
    scene = tmp_path / "evil.yaml"
    scene.write_text(f'title: !!python/object/apply:os.system ["touch {canary}"]\n'
                     f'venue: !!python/object/new:pathlib.Path ["{canary}"]\n')
    with pytest.raises(SceneError, match="not allowed"):
        load_scene(scene)
    assert not canary.exists()


def test_process_exit_code_and_no_traceback():
    """The real command line, as a process: status 2 and one line on stderr."""
    for name in ("include-loop-a.yaml",):
        out = subprocess.run([sys.executable, "-m", "domegen", "check", str(BROKEN / name)],
                             capture_output=True, text=True)
        assert out.returncode == 2
        assert "Traceback" not in out.stderr and out.stderr.startswith("domegen: error: ")
