"""Evaluate large arrays in fixed-size blocks, so that peak memory stays bounded.

A vectorized evaluation holds a few dozen temporaries of the full size; at 10⁷ points that is gigabytes and most
of the time goes to fetching fresh memory from the operating system. :func:`blocked` wraps a public function whose
inputs broadcast to one shape: above :data:`BLOCK_POINTS` points it broadcasts the numeric inputs (including the
arrays inside ``Layer`` and ``Surroundings`` objects), evaluates contiguous blocks of the flattened points, and
writes each result field into its place. Below it, the function runs as it is. The numbers are those of one call:
every point is computed on its own (no point sees another), and the warning bits stay with their points.
When a block raises, the call is made again in one piece, so that the error (its counts, values and indices) is
the function's own for the whole input, word for word; an iterator argument is read once, before the blocks.
"""
from __future__ import annotations

import dataclasses
import functools
import inspect
from collections.abc import Iterator

import numpy as np

__all__ = ["BLOCK_POINTS", "blocked"]

#: Points per block: large enough that per-call overhead is negligible, small enough for the caches.
BLOCK_POINTS = 65536


def _numeric(value) -> np.ndarray | None:
    """``value`` as a float array if it is a number or an array (or nested sequence) of numbers, else ``None``."""
    if value is None or isinstance(value, (str, bytes, bool, np.bool_)):
        return None
    if isinstance(value, np.ndarray):
        return value if value.dtype.kind in "fiu" else None
    if isinstance(value, (int, float, np.number)):
        return np.asarray(value, dtype=float)
    if isinstance(value, (list, tuple)) or hasattr(value, "__array__"):
        try:
            array = np.asarray(value, dtype=float)  # nested lists, pandas objects; Layer lists fail here
        except (TypeError, ValueError):
            return None
        return array if array.ndim > 0 else None
    return None


class _Parts:
    """Where the per-point arrays of a call are: plain arguments, layers' thicknesses and conductivities, fields of
    a Surroundings object."""

    def __init__(self, arguments: dict):
        from .pipe import Layer
        from .surroundings import Surroundings

        self.arguments = arguments
        self.arrays = {}  # key -> array; key = (argument,) or (argument, index, attribute) or (argument, field)
        for name, value in arguments.items():
            array = _numeric(value)
            if array is not None and array.ndim > 0:
                self.arrays[(name,)] = array
            elif isinstance(value, (list, tuple)) and value and all(isinstance(v, Layer) for v in value):
                for i, layer in enumerate(value):
                    if np.ndim(layer.thickness) > 0:
                        self.arrays[(name, i, "thickness")] = np.asarray(layer.thickness, dtype=float)
                    c = layer.conductivity
                    if c.is_constant and np.ndim(c.constant_value) > 0:
                        self.arrays[(name, i, "conductivity")] = np.asarray(c.constant_value, dtype=float)
            elif isinstance(value, Surroundings):
                for field in dataclasses.fields(value):
                    part = _numeric(getattr(value, field.name))
                    if part is not None and part.ndim > 0:
                        self.arrays[(name, field.name)] = part

    def shape(self) -> tuple[int, ...]:
        return np.broadcast_shapes(*(a.shape for a in self.arrays.values())) if self.arrays else ()

    def block(self, flat: dict, start: int, stop: int) -> dict:
        """The call's arguments with every per-point array cut to points ``start:stop`` (flattened)."""
        from .pipe import Layer

        out = dict(self.arguments)
        for key, array in flat.items():
            part = array[start:stop]
            if len(key) == 1:
                out[key[0]] = part
            elif len(key) == 3:
                name, i, attribute = key
                layers = list(out[name])
                layer = layers[i]
                thickness = part if attribute == "thickness" else layer.thickness
                conductivity = part if attribute == "conductivity" else layer.conductivity
                layers[i] = Layer(thickness, conductivity, name=layer.name)
                out[name] = layers
            else:
                name, field = key
                out[name] = dataclasses.replace(out[name], **{field: part})
        return out


class _Filler:
    """The full-size result, filled block by block (each block's result is dropped once copied)."""

    def __init__(self, size: int, shape: tuple[int, ...]):
        self.size, self.shape, self.first, self.out = size, shape, None, {}

    def _fields(self, result):
        if dataclasses.is_dataclass(result):
            return {f.name: getattr(result, f.name) for f in dataclasses.fields(result)}
        return {None: result}

    def add(self, result, start: int, stop: int) -> None:
        fields = self._fields(result)
        if self.first is None:
            self.first = result
            for name, value in fields.items():
                if isinstance(value, np.ndarray):
                    lead = value.shape[:-1] if value.ndim > 1 else ()
                    self.out[name] = np.empty(lead + (self.size,), dtype=value.dtype)
        for name, target in self.out.items():
            value = np.asarray(fields[name])
            target[..., start:stop] = value.reshape(value.shape[:-1] + (stop - start,)) if value.ndim > 1 \
                else np.ravel(value)

    def result(self):
        shaped = {name: array.reshape(array.shape[:-1] + self.shape) for name, array in self.out.items()}
        if None in shaped:
            return shaped[None]
        return dataclasses.replace(self.first, **shaped)


def _points_at_most(value) -> int | None:
    """An upper bound of the points ``value`` brings to a call (the product of its arrays' sizes), or None
    where only binding the arguments tells (an iterator, an unknown object holding arrays)."""
    from .pipe import Layer
    from .surroundings import Surroundings

    if value is None or isinstance(value, (int, float, str, bytes, np.number, np.bool_)):
        return 1
    if isinstance(value, np.ndarray):
        return value.size
    if isinstance(value, Layer):
        c = value.conductivity
        return np.size(value.thickness) * (np.size(c.constant_value) if c.is_constant else 1)
    if isinstance(value, Surroundings):
        return int(np.prod([np.size(getattr(value, f.name)) for f in dataclasses.fields(value)
                            if not isinstance(getattr(value, f.name), str)]))
    if isinstance(value, (list, tuple)):
        total = 1
        for item in value:
            part = _points_at_most(item)
            if part is None:
                return None
            total *= part
        return total
    return None


def _small(args, kwargs) -> bool:
    """True when the call surely has at most :data:`BLOCK_POINTS` points (then it runs as it is, unbound)."""
    total = 1
    for value in (*args, *kwargs.values()):
        part = _points_at_most(value)
        if part is None:
            return False
        total *= part
        if total > BLOCK_POINTS:
            return False
    return True


def blocked(function):
    """Decorate a public function so that calls above :data:`BLOCK_POINTS` points run block by block."""
    signature = inspect.signature(function)

    @functools.wraps(function)
    def wrapper(*args, **kwargs):
        if _small(args, kwargs):
            return function(*args, **kwargs)
        try:
            bound = signature.bind(*args, **kwargs)
        except TypeError:
            return function(*args, **kwargs)  # the function reports its own argument errors
        # An iterator (a generator of layers) would be used up by the first block: read it once, for any call.
        for name, value in bound.arguments.items():
            if isinstance(value, Iterator):
                bound.arguments[name] = tuple(value)
        parts = _Parts(dict(bound.arguments))
        try:
            shape = parts.shape()
        except ValueError:
            return function(*bound.args, **bound.kwargs)  # shapes that do not broadcast: the function says which
        size = int(np.prod(shape, dtype=np.int64))
        if size <= BLOCK_POINTS:
            return function(*bound.args, **bound.kwargs)
        flat = {key: np.ascontiguousarray(np.broadcast_to(array, shape)).ravel() for key, array in parts.arrays.items()}
        filler = _Filler(size, shape)
        for start in range(0, size, BLOCK_POINTS):
            stop = min(start + BLOCK_POINTS, size)
            try:
                result = function(**parts.block(flat, start, stop))
            except Exception:
                # A block's error would name its own points (counts, indices, values): the call in one piece
                # raises the function's own error for the whole input, word for word.
                del filler, flat
                return function(*bound.args, **bound.kwargs)
            filler.add(result, start, stop)
        return filler.result()

    return wrapper
