"""Command-line values read without pydantic: the typer group class of ``relaywright``.

Recent typer releases convert every parameter value through a pydantic ``TypeAdapter`` (flags given on the command
line excepted); importing pydantic and building the adapters costs about 0.1 s, as much as a whole
``relaywright settings`` run without it. relaywright's parameters are plain paths, strings, integers and flags, so
:class:`PlainValuesGroup` gives those parameters (its own, each command's, and the help options) the reading of
:class:`PlainArgument` / :class:`PlainOption`: a well-formed value is read with ``Path``/``str``/``int``, and
everything else (a malformed number, a value out of range, a path with typer's checks switched on, any other type)
goes to typer unchanged, so errors keep typer's own messages. With a typer that converts through click types (its
parameters have no ``type_descriptor``) nothing is changed.
"""

from __future__ import annotations

import os
import re
from pathlib import Path

from typer.core import TyperArgument, TyperGroup, TyperOption

_INTEGER = re.compile(r"[+-]?[0-9]{1,18}")


def _plain_path(info) -> bool:
    """A path parameter with none of typer's checks switched on (exists, file/dir only, writable, ...)."""
    return (not info.exists and info.file_okay and info.dir_okay and not info.writable and not info.resolve_path
            and not info.allow_dash and info.path_type is None)


def _plain(param) -> bool:
    desc = getattr(param, "type_descriptor", None)
    if desc is None or param.nargs != 1 or desc.parameter_info.parser is not None:
        return False
    if param.multiple:  # a repeatable path option (verify --trust)
        return desc.annotation == list[Path] and _plain_path(desc.parameter_info)
    if desc.annotation is Path:
        return _plain_path(desc.parameter_info)
    if desc.annotation is int:
        return not desc.parameter_info.clamp
    return desc.annotation in (str, bool)


def _read(param, ctx, value, typers_reading):
    """A plain Path, str or int value read directly when well formed; anything else goes to ``typers_reading``."""
    desc = param.type_descriptor
    kind, info = desc.annotation, desc.parameter_info
    if param.multiple:  # each value of a repeatable path option, as a list; None when it is not given
        if value is not None and not (isinstance(value, (list, tuple)) and all(isinstance(v, str) for v in value)):
            return typers_reading(ctx, value)
        value = [Path(v) for v in value or ()] or None
        return param.callback(ctx, param, value) if param.callback is not None else value
    if isinstance(value, str):
        if kind is int:
            if not _INTEGER.fullmatch(value):
                return typers_reading(ctx, value)  # typer's message for a malformed number
            number = int(value)
            if (info.min is not None and number < info.min) or (info.max is not None and number > info.max):
                return typers_reading(ctx, value)  # typer's message for a value out of range
            value = number
        elif kind is Path:
            if info.readable and os.path.exists(value) and not os.access(value, os.R_OK):
                return typers_reading(ctx, value)  # typer's "is not readable"
            value = Path(value)
    elif value is None:
        if param.required:
            return typers_reading(ctx, value)  # typer's "missing" message
    elif not isinstance(value, kind):
        return typers_reading(ctx, value)
    if param.callback is not None:
        value = param.callback(ctx, param, value)
    return value


class PlainArgument(TyperArgument):
    """A typer argument whose plain value is read without pydantic."""

    def process_value(self, ctx, value):
        return _read(self, ctx, value, super().process_value)


class PlainOption(TyperOption):
    """A typer option whose plain value is read without pydantic."""

    def process_value(self, ctx, value):
        return _read(self, ctx, value, super().process_value)


def read_plainly(params) -> None:
    """Give each plain typer parameter in ``params`` the reading above (in place)."""
    for param in params:
        if isinstance(param, (PlainArgument, PlainOption)) or not _plain(param):
            continue
        if isinstance(param, TyperArgument):
            param.__class__ = PlainArgument
        elif isinstance(param, TyperOption):
            param.__class__ = PlainOption


class PlainValuesGroup(TyperGroup):
    """The root group: its own parameters and those of each command it looks up are read as above."""

    def get_params(self, ctx):
        params = super().get_params(ctx)
        read_plainly(params)
        return params

    def get_command(self, ctx, cmd_name):
        command = super().get_command(ctx, cmd_name)
        if command is not None:
            help_option = command.get_help_option(ctx) if ctx is not None else None
            read_plainly([*command.params, *([help_option] if help_option is not None else [])])
        return command
