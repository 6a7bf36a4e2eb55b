"""Late binding of feature functions named as ``"module:function"`` (keeps imports lazy)."""

from __future__ import annotations

import importlib


def resolve(target: str):
    """The function named by ``"package.module:function"``, imported on first use."""
    module_name, function_name = target.split(":")
    return getattr(importlib.import_module(module_name), function_name)
