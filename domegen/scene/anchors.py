"""Sky instants anchored on events computed at the venue.

"sunset", "10 s before second contact", "U2 + 1 min": the event is computed
for the scene's site (day events by the almanac, solar contacts by the local
circumstances of the scene's eclipse, lunar contacts from the lunar eclipse)
and every resolved event is kept, so ``domegen check`` can list them.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date, datetime, timedelta, timezone

from domegen.errors import DomegenError, SceneError
from domegen.scene.grammar import DAY_EVENTS, LUNAR_EVENTS, SOLAR_EVENTS, InstantExpr
from domegen.sky.site import Site
from domegen.sky.times import parse_instant, zone

_SOLAR_LABEL = {"c1": "C1 (first contact)", "c2": "C2 (second contact)", "c3": "C3 (third contact)",
                "c4": "C4 (fourth contact)", "max": "maximum eclipse"}


@dataclass(frozen=True)
class ResolvedEvent:
    """One event used by a scene, at the venue."""

    label: str
    utc: datetime


@dataclass
class EventResolver:
    """Resolves event names for one site, caching each computation.

    ``eclipse`` is ``(kind, date)`` or None; day events use the given local date.
    """

    site: Site
    eclipse: tuple | None = None
    resolved: dict = field(default_factory=dict)   # label -> ResolvedEvent
    _solar: object = None
    _lunar: object = None

    def resolve(self, expr: InstantExpr, *, day: date | None, ctx) -> datetime:
        """The UTC instant of ``expr``; ``ctx`` (a fields.Ctx) locates any error."""
        if not expr.is_event:
            try:
                base = parse_instant(expr.base, self.site.timezone, field=ctx.path)
            except DomegenError as err:
                raise ctx.error(err.message, value=expr.base, hint=err.hint) from None
            return base + timedelta(seconds=expr.offset_s)
        key = expr.base
        if key in DAY_EVENTS:
            utc = self._day_event(key, day, ctx)
        elif key in ("maximum", "greatest eclipse"):
            if self.eclipse is not None and self.eclipse[0] == "lunar":
                utc = self._lunar_event("greatest", ctx)
            else:
                utc = self._solar_event("max", ctx)
        elif key in SOLAR_EVENTS:
            utc = self._solar_event(SOLAR_EVENTS[key], ctx)
        elif key in LUNAR_EVENTS:
            utc = self._lunar_event(LUNAR_EVENTS[key], ctx)
        else:  # pragma: no cover - the grammar only lets known names through
            raise ctx.error(f"unknown event {key!r}")
        return utc + timedelta(seconds=expr.offset_s)

    def _remember(self, label: str, utc: datetime) -> datetime:
        self.resolved.setdefault(label, ResolvedEvent(label, utc))
        return utc

    def _day_event(self, key: str, day: date | None, ctx) -> datetime:
        if day is None and self.eclipse is not None:
            day = self.eclipse[1]
        if day is None:
            raise ctx.error(f"the event {key!r} needs a date", value=key,
                            hint="add 'date: YYYY-MM-DD' at the top of the scene or in this shot's sky")
        label = f"{key} {day.isoformat()}"
        if label in self.resolved:
            return self.resolved[label].utc
        try:
            from domegen.sky.almanac import next_event
        except ImportError:
            raise ctx.error(f"day events such as {key!r} need domegen.sky.almanac, missing from this build",
                            value=key) from None
        tz = zone(self.site.timezone)
        midnight = datetime(day.year, day.month, day.day, tzinfo=tz).astimezone(timezone.utc)
        try:
            utc = next_event(self.site, DAY_EVENTS[key], midnight)
        except DomegenError as err:
            raise ctx.error(f"no {key} on {day.isoformat()} at the venue: {err.message}", value=key) from None
        if utc is None or utc - midnight > timedelta(hours=36):
            raise ctx.error(f"no {key} on {day.isoformat()} at the venue (polar day or night?)", value=key)
        return self._remember(label, utc.astimezone(timezone.utc))

    def _need_eclipse(self, kind: str, ctx):
        if self.eclipse is None:
            raise ctx.error(f"contact names need the eclipse they refer to", value=ctx.path,
                            hint=f"add 'eclipse: {{kind: {kind}, date: YYYY-MM-DD}}' at the top of the scene")
        if self.eclipse[0] != kind:
            raise ctx.error(f"this is a {kind} eclipse event but the scene's eclipse is {self.eclipse[0]}",
                            hint="solar contacts are C1-C4; lunar contacts are P1, U1-U4, P4")

    def _solar_event(self, key: str, ctx) -> datetime:
        self._need_eclipse("solar", ctx)
        if self._solar is None:
            try:
                from domegen.eclipse import local_circumstances, solar_eclipse_on
            except ImportError:
                raise ctx.error("solar contacts need domegen.eclipse, missing from this build") from None
            try:
                ecl = solar_eclipse_on(self.eclipse[1])
                self._solar = local_circumstances(ecl, self.site)
            except DomegenError as err:
                raise ctx.error(err.message, hint=err.hint) from None
        lc = self._solar
        if hasattr(lc, "utc"):
            utc = lc.utc(key, 0)
        else:  # per-contact attributes
            utc = _first(getattr(lc, "max_utc" if key == "max" else f"{key}_utc", None))
        if utc is None:
            mag = _first(getattr(lc, "magnitude", None))
            here = _first(getattr(lc, "type_here", None))
            what = f"a {here} eclipse here" if here is not None else "not total here"
            raise ctx.error(f"{_SOLAR_LABEL[key]} does not happen at the venue ({what}"
                            + (f", magnitude {float(mag):.3f}" if mag is not None else "") + ")",
                            hint="C2/C3 need a venue inside the path of totality; or anchor on 'maximum'")
        return self._remember(_SOLAR_LABEL[key], _aware(utc))

    def _lunar_event(self, key: str, ctx) -> datetime:
        self._need_eclipse("lunar", ctx)
        if self._lunar is None:
            try:
                from domegen.eclipse.lunar import lunar_eclipse_on
            except ImportError:
                raise ctx.error("lunar contacts need domegen.eclipse.lunar, missing from this build") from None
            try:
                self._lunar = lunar_eclipse_on(self.eclipse[1])
            except DomegenError as err:
                raise ctx.error(err.message, hint=err.hint) from None
        utc = self._lunar.contacts_utc.get(key)
        if utc is None:
            raise ctx.error(f"the lunar eclipse of {self.eclipse[1]} has no {key} contact",
                            hint="a partial eclipse has no U2/U3; a penumbral one has no U1-U4")
        label = "greatest lunar eclipse" if key == "greatest" else f"{key} (lunar contact)"
        return self._remember(label, _aware(utc))


def _first(v):
    """The one value of a per-site result (scalar, list or array)."""
    if v is None or isinstance(v, (datetime, float, int)):
        return v
    try:
        return v[0] if len(v) else None
    except TypeError:
        return v


def _aware(dt: datetime) -> datetime:
    if dt.tzinfo is None:
        dt = dt.replace(tzinfo=timezone.utc)
    return dt.astimezone(timezone.utc)


def parse_day(text) -> date | None:
    """A ``date`` from YAML date or ``YYYY-MM-DD`` text (already validated)."""
    if text is None:
        return None
    if isinstance(text, date):
        return text
    return date.fromisoformat(str(text)[:10])


__all__ = ["EventResolver", "ResolvedEvent", "parse_day", "SceneError"]
