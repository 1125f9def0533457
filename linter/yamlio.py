"""Safe YAML loading that remembers where every mapping key and list item came from.

Only YAML's plain data types are constructed (``yaml.SafeLoader``): a tag such as
``!!python/object`` is refused with a one-line error naming the file and line. Mappings load as
:class:`LocatedDict` and sequences as :class:`LocatedList`, so a validator can say
``design.yaml:14:5: rail 'VCC' has no nominal voltage`` instead of a bare message.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import yaml

from linter.errors import InputError, SourceLocation
from linter.textfile import read_text_input


class LocatedDict(dict):
    """A mapping from YAML with the location of itself, of each key and of each value."""

    location: SourceLocation
    key_locations: dict[Any, SourceLocation]
    value_locations: dict[Any, SourceLocation]

    def where(self, key: Any | None = None) -> SourceLocation:
        """Location of ``key``'s value if present, else of the key, else of the mapping."""
        if key is not None:
            if key in self.value_locations:
                return self.value_locations[key]
            if key in self.key_locations:
                return self.key_locations[key]
        return self.location


class LocatedList(list):
    """A sequence from YAML with the location of itself and of each item."""

    location: SourceLocation
    item_locations: list[SourceLocation]

    def where(self, index: int | None = None) -> SourceLocation:
        if index is not None and 0 <= index < len(self.item_locations):
            return self.item_locations[index]
        return self.location


def _mark(file: str, node: yaml.Node) -> SourceLocation:
    return SourceLocation(file, node.start_mark.line + 1, node.start_mark.column + 1)


class _Located:
    """Builds located containers; duplicate keys are an error. Mixed into a safe loader."""

    source_name = "<yaml>"

    def construct_located_mapping(self, node: yaml.MappingNode) -> LocatedDict:
        result = LocatedDict()
        result.location = _mark(self.source_name, node)
        result.key_locations = {}
        result.value_locations = {}
        self.flatten_mapping(node)
        for key_node, value_node in node.value:
            key = self.construct_object(key_node, deep=True)
            try:
                hash(key)
            except TypeError:
                raise InputError("a mapping key must be a plain value", _mark(self.source_name, key_node))
            if key in result:
                raise InputError(f"duplicate key '{key}'", _mark(self.source_name, key_node))
            result[key] = self.construct_object(value_node, deep=True)
            result.key_locations[key] = _mark(self.source_name, key_node)
            result.value_locations[key] = _mark(self.source_name, value_node)
        return result

    def construct_located_sequence(self, node: yaml.SequenceNode) -> LocatedList:
        result = LocatedList(self.construct_object(child, deep=True) for child in node.value)
        result.location = _mark(self.source_name, node)
        result.item_locations = [_mark(self.source_name, child) for child in node.value]
        return result


class _Loader(_Located, yaml.SafeLoader):
    """The pure-Python safe loader: its messages are the ones the user sees."""


# libyaml's parser, where PyYAML has it, reads six times faster and gives the same marks; its
# error texts differ, so a file it rejects is read again by the pure loader for the message.
_FastLoader: type = type("_FastLoader", (_Located, yaml.CSafeLoader), {}) if yaml.__with_libyaml__ else _Loader

for _loader in {_Loader, _FastLoader}:
    _loader.add_constructor(yaml.resolver.BaseResolver.DEFAULT_MAPPING_TAG, _Located.construct_located_mapping)
    _loader.add_constructor(yaml.resolver.BaseResolver.DEFAULT_SEQUENCE_TAG, _Located.construct_located_sequence)


def load_yaml_text(text: str, source_name: str) -> Any:
    """Parse YAML text; errors become :class:`InputError` with ``source_name:line:column``."""
    try:
        return _load(_FastLoader, text, source_name)
    except yaml.YAMLError:
        return _load_for_message(text, source_name)


def _load(loader_class: type, text: str, source_name: str) -> Any:
    loader = loader_class(text)
    loader.source_name = source_name
    try:
        return loader.get_single_data()
    finally:
        loader.dispose()


def _load_for_message(text: str, source_name: str) -> Any:
    """The pure loader on text the fast one rejected: raises its error as an :class:`InputError`."""
    try:
        return _load(_Loader, text, source_name)
    except yaml.constructor.ConstructorError as error:
        mark = error.problem_mark
        where = SourceLocation(source_name, mark.line + 1, mark.column + 1) if mark else SourceLocation(source_name)
        tag = f" ({error.problem})" if error.problem else ""
        raise InputError(f"YAML construct not allowed here{tag}", where) from None
    except yaml.MarkedYAMLError as error:
        mark = error.problem_mark or error.context_mark
        where = SourceLocation(source_name, mark.line + 1, mark.column + 1) if mark else SourceLocation(source_name)
        raise InputError(f"malformed YAML: {error.problem or error.context}", where) from None
    except yaml.YAMLError as error:
        raise InputError(f"malformed YAML: {error}", SourceLocation(source_name)) from None


def load_yaml_file(path: str | Path) -> Any:
    """Read and parse a YAML file; a missing, unreadable or binary file is an :class:`InputError`."""
    name = str(path)
    text = read_text_input(path, "YAML")
    return load_yaml_text(text, name)
