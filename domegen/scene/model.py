"""A loaded scene: venue, dome, output, shots; ``frame_spec(n)`` for any frame."""

from __future__ import annotations

import bisect
import functools
import os
from dataclasses import dataclass, field
from datetime import datetime
from pathlib import Path

from domegen.errors import OutOfRangeError, SceneError
from domegen.scene.schema import LAYER_FIELDS
from domegen.scene.timeline import Shot, slerp_deg
from domegen.sky.site import Site
from domegen.sky.times import from_unix_seconds


@dataclass(frozen=True)
class OutputSettings:
    """Where frames go: ``root`` folder (absolute), file ``pattern`` with ``{frame}``, format, depth, rate."""

    root: Path
    pattern: str
    format: str
    bit_depth: int
    fps: float

    def relative_name(self, n: int) -> str:
        return self.pattern.format(frame=n)

    def frame_path(self, n: int, *, allow_outside: bool = False) -> Path:
        """The file of frame ``n``; :class:`SceneError` if it would leave ``root`` (unless allowed)."""
        root = self._real_root
        p = os.path.normpath(os.path.join(root, self.relative_name(n)))
        if not allow_outside and os.path.commonpath([root, p]) != root:
            raise SceneError(f"frame {n} would be written outside the output folder: {p}",
                             field="output.file_pattern", value=self.pattern,
                             hint="remove '..' and absolute paths from the pattern, or pass "
                                  "--allow-outside-output if you really mean it")
        return Path(p)

    @functools.cached_property
    def _real_root(self) -> str:
        return str(self.root.resolve())


@dataclass(frozen=True)
class Scene:
    """A validated scene with every event resolved. Picklable; send it to workers as is."""

    path: Path | None
    title: str | None
    venue_name: str | None
    site: Site
    dome: dict
    output: OutputSettings
    layer_base: dict
    shots: tuple
    events: tuple = ()        # ResolvedEvent, in time order
    files: tuple = ()         # the scene file and every file it includes
    base_dir: Path = field(default=Path("."))

    @property
    def frame_count(self) -> int:
        last = self.shots[-1]
        return last.first_frame + last.frame_count

    @property
    def duration_s(self) -> float:
        return self.frame_count / self.output.fps

    def shot_of(self, n: int) -> tuple[Shot, float]:
        """The shot holding frame ``n`` and the show time inside it (s)."""
        if not 0 <= n < self.frame_count:
            raise OutOfRangeError(f"frame {n} is outside 0..{self.frame_count - 1}", field="frame", value=n)
        i = bisect.bisect_right(self._firsts, n) - 1
        shot = self.shots[i]
        return shot, (n - shot.first_frame) / self.output.fps

    @functools.cached_property
    def _firsts(self) -> list:
        return [s.first_frame for s in self.shots]

    def sky_utc(self, n: int) -> datetime:
        shot, t = self.shot_of(n)
        return from_unix_seconds(shot.sky_utc_s(t))

    def show_time_s(self, n: int) -> float:
        return n / self.output.fps

    def sky_span(self) -> tuple[datetime, datetime]:
        """Earliest and latest sky instant over all frames."""
        ends = []
        for s in self.shots:
            ends += [s.sky_utc_s(0.0), s.sky_utc_s((s.frame_count - 1) / self.output.fps)]
        return from_unix_seconds(min(ends)), from_unix_seconds(max(ends))

    def frame_spec(self, n: int):
        """The renderer's FrameSpec for frame ``n`` (a pure function of the scene and ``n``)."""
        from domegen.render.spec import FrameSpec

        shot, t = self.shot_of(n)
        utc = from_unix_seconds(shot.sky_utc_s(t))
        return FrameSpec(site=self.site, utc=utc, camera=self._camera(shot, t, utc),
                         layers=self._layers(shot, t))

    def _camera(self, shot: Shot, t: float, utc: datetime):
        from domegen.render.spec import CameraSpec

        def chan(name, base):
            tr = shot.camera.get(name)
            return tr.value_at(t) if tr is not None else base

        front = chan("front_azimuth", self.dome["front_azimuth"])
        tilt = chan("tilt", self.dome["tilt"])
        view_az = view_alt = None
        look = shot.camera.get("look")
        if look is not None:
            a, b, w = look.bracket(t)
            da = self._direction(a.value, utc, front, tilt)
            db = self._direction(b.value, utc, front, tilt)
            view_az, view_alt = slerp_deg(da, db, w)
        return CameraSpec(size_px=int(self.dome["size"]), field_deg=chan("field", self.dome["field"]),
                          front_az_deg=front % 360.0, tilt_deg=tilt, view_az_deg=view_az,
                          view_alt_deg=view_alt, roll_deg=chan("roll", 0.0))

    def _direction(self, value: tuple, utc: datetime, front: float, tilt: float) -> tuple:
        kind = value[0]
        if kind == "body":
            from domegen.sky.bodies import body_positions
            from domegen.sky.times import unix_seconds

            tab = body_positions(self.site, unix_seconds(utc), names=(value[1],)).body(value[1])
            return float(tab.az_deg.reshape(-1)[0]), float(tab.alt_refracted_deg.reshape(-1)[0])
        az = value[1] if value[1] is not None else front
        alt = value[2] if value[2] is not None else 90.0 - tilt
        return az, alt

    def _layers(self, shot: Shot, t: float):
        from domegen.render.spec import LayerSpec, spec_fields

        allowed = set(spec_fields(LayerSpec))
        kw = {}
        for key, (spec_name, _) in LAYER_FIELDS.items():
            tr = shot.layers.get(key)
            v = tr.value_at(t) if tr is not None else self.layer_base.get(key)
            if v is None:
                continue
            if key == "exposure":
                v = None if v == "auto" else float(v)
            elif key == "light_pollution":
                v = int(round(v))
            elif key == "noise_seed":
                v = int(v)
            elif key == "panorama":
                v = str((self.base_dir / v).resolve())
            if spec_name in allowed:
                kw[spec_name] = v
        return LayerSpec(**kw)

    def frame_info(self, n: int) -> dict:
        """Facts about frame ``n`` for labels and logs."""
        shot, t = self.shot_of(n)
        utc = self.sky_utc(n)
        return {"frame": n, "shot": shot.name, "shot_index": shot.index, "show_time_s": self.show_time_s(n),
                "shot_time_s": t, "utc": utc}
