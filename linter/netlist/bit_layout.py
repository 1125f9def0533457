"""The bit layout of a net's type: how many bits, their declared range, and each bit's name."""

from __future__ import annotations

from typing import NamedTuple


def bit_width(symbol_type: object) -> int:
    """How many net bits a net or variable has.

    slang gives an unpacked array (``reg mem [0:3]``) a bit width of 0; counting its elements
    keeps ``mem[2]`` a real bit instead of silently connecting nothing.
    """
    if symbol_type.isUnpackedArray:
        return symbol_type.selectableWidth
    return symbol_type.bitWidth


class TypeShape(NamedTuple):
    width: int
    lower: int
    upper: int
    descending: bool
    declared_width: int  # elements of the outermost dimension
    is_array: bool


def bit_names(name: str, shape: TypeShape) -> list[str]:
    """The name of each bit of a net of this shape, LSB first: ``d``, ``d[0]``, ``m[1][0]``."""
    width = shape.width
    if width == 1 and not shape.is_array:
        return [name]
    if shape.declared_width == width or not shape.is_array:
        first, step = (shape.lower, 1) if shape.descending else (shape.upper, -1)
        return [f"{name}[{first + step * offset}]" for offset in range(width)]
    # multi-dimensional: name the outer index, then the offset inside it
    per_element = width // shape.declared_width
    names = []
    for offset in range(width):
        outer, inner = divmod(offset, per_element)
        index = shape.lower + outer if shape.descending else shape.upper - outer
        names.append(f"{name}[{index}][{inner}]")
    return names
