"""YAML with positions: safe loading that remembers file, line and column.

The text is composed into nodes by PyYAML's ``SafeLoader`` (so no tag can
build a Python object) and converted to plain values here.  Mappings become
:class:`Map` and sequences :class:`Seq`; both remember where each of their
values (and keys) came from, so that every later error can name
``file:line:column``.  Lines and columns are 1-based.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import yaml

from domegen.errors import SceneError

#: Guards against alias bombs and self-referencing aliases.
MAX_NODES = 50_000
MAX_DEPTH = 64
MAX_BYTES = 4_000_000


@dataclass(frozen=True)
class Mark:
    """A position in a scene file (1-based line and column)."""

    file: str
    line: int
    column: int

    def error(self, message: str, **kw) -> SceneError:
        return SceneError(message, file=self.file, line=self.line, column=self.column, **kw)


class Map(dict):
    """A YAML mapping that remembers where each key and value was written."""

    mark: Mark | None = None

    def __init__(self, *a, **kw):
        super().__init__(*a, **kw)
        self.value_marks: dict = {}
        self.key_marks: dict = {}

    def mark_of(self, key) -> Mark | None:
        return self.value_marks.get(key) or self.mark


class Seq(list):
    """A YAML sequence that remembers where each item was written."""

    mark: Mark | None = None

    def __init__(self, *a, **kw):
        super().__init__(*a, **kw)
        self.item_marks: list = []

    def mark_of(self, index: int) -> Mark | None:
        if 0 <= index < len(self.item_marks):
            return self.item_marks[index]
        return self.mark


def _mark(file: str, m) -> Mark:
    return Mark(file, m.line + 1, m.column + 1)


class _Converter:
    def __init__(self, file: str, loader: yaml.SafeLoader):
        self.file = file
        self.loader = loader
        self.count = 0

    def convert(self, node, depth: int = 0):
        self.count += 1
        if self.count > MAX_NODES:
            raise _mark(self.file, node.start_mark).error(
                f"the file expands to more than {MAX_NODES} values (too many aliases?)")
        if depth > MAX_DEPTH:
            raise _mark(self.file, node.start_mark).error(
                f"nesting deeper than {MAX_DEPTH} levels (a self-referencing alias?)")
        here = _mark(self.file, node.start_mark)
        if isinstance(node, yaml.MappingNode):
            if node.tag != "tag:yaml.org,2002:map":
                raise here.error(f"the tag {node.tag!r} is not allowed in a scene file")
            self.loader.flatten_mapping(node)
            out = Map()
            out.mark = here
            for knode, vnode in node.value:
                kmark = _mark(self.file, knode.start_mark)
                if not isinstance(knode, yaml.ScalarNode):
                    raise kmark.error("a key must be a plain word, not a list or mapping")
                key = self.scalar(knode)
                if not isinstance(key, str):
                    # YAML 1.1 reads yes/no/on/off as booleans; keys are words for us.
                    key = knode.value
                if key in out:
                    first = out.key_marks[key]
                    raise kmark.error(f"the key {key!r} appears twice (first at line {first.line})",
                                      hint="remove one of them")
                out.key_marks[key] = kmark
                out.value_marks[key] = _mark(self.file, vnode.start_mark)
                out[key] = self.convert(vnode, depth + 1)
            return out
        if isinstance(node, yaml.SequenceNode):
            if node.tag != "tag:yaml.org,2002:seq":
                raise here.error(f"the tag {node.tag!r} is not allowed in a scene file")
            out = Seq()
            out.mark = here
            for item in node.value:
                out.item_marks.append(_mark(self.file, item.start_mark))
                out.append(self.convert(item, depth + 1))
            return out
        return self.scalar(node)

    def scalar(self, node):
        try:
            return self.loader.construct_object(node, deep=True)
        except yaml.constructor.ConstructorError as err:
            m = err.problem_mark or node.start_mark
            raise _mark(self.file, m).error(
                f"cannot read this value: {err.problem}",
                hint="scene files hold plain numbers, words, lists and mappings") from None
        except (ValueError, OverflowError) as err:
            raise _mark(self.file, node.start_mark).error(f"cannot read the value {node.value!r}: {err}") \
                from None


def parse_text(text: str, file: str = "<scene>"):
    """Parse YAML text into :class:`Map`/:class:`Seq`/scalars; :class:`SceneError` on bad YAML."""
    if len(text) > MAX_BYTES:
        raise SceneError(f"the file is larger than {MAX_BYTES} bytes", file=file, line=1, column=1)
    try:
        loader = yaml.SafeLoader(text)
    except yaml.reader.ReaderError as err:
        line = text.count("\n", 0, err.position) + 1
        col = err.position - (text.rfind("\n", 0, err.position) + 1) + 1
        raise SceneError(f"character {err.character!r} is not allowed in a scene file", file=file,
                         line=line, column=col, hint="remove control characters") from None
    try:
        node = loader.get_single_node()
        if node is None:
            return None
        return _Converter(file, loader).convert(node)
    except yaml.MarkedYAMLError as err:
        m = err.problem_mark or err.context_mark
        line, col = (m.line + 1, m.column + 1) if m is not None else (1, 1)
        what = err.problem or err.context or "invalid YAML"
        raise SceneError(f"YAML syntax error: {what}", file=file, line=line, column=col,
                         hint="check indentation, colons and quotes") from None
    except yaml.reader.ReaderError as err:
        line = text.count("\n", 0, err.position) + 1
        raise SceneError(f"character {err.character!r} is not allowed in a scene file", file=file,
                         line=line, column=1, hint="remove control characters") from None
    except yaml.YAMLError as err:
        raise SceneError(f"YAML error: {' '.join(str(err).split())}", file=file, line=1, column=1) from None
    except RecursionError:
        raise SceneError("the file nests too deeply", file=file, line=1, column=1) from None
    finally:
        loader.dispose()


def read_file(path: Path) -> str:
    """The text of a scene file, or a located :class:`SceneError`."""
    try:
        data = Path(path).read_bytes()
    except FileNotFoundError:
        raise SceneError(f"no such scene file: {path}", field="file", value=str(path)) from None
    except IsADirectoryError:
        raise SceneError(f"{path} is a folder, not a scene file", field="file", value=str(path)) from None
    except OSError as err:
        raise SceneError(f"cannot read {path}: {err.strerror}", field="file", value=str(path)) from None
    if len(data) > MAX_BYTES:
        raise SceneError(f"the file is larger than {MAX_BYTES} bytes", file=str(path), line=1, column=1)
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as err:
        line = data[: err.start].count(b"\n") + 1
        raise SceneError("the file is not UTF-8 text", file=str(path), line=line, column=1) from None
