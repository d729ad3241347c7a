"""Write a scenario document back into the text it was read from, keeping the user's comments,
key order, inline tables and spelling wherever a value did not change.

Method: the original text is parsed with tomlkit (a style-preserving TOML library); the new
document is merged into it key by key — equal values are left untouched (their text stays as
written), changed values are replaced, new keys appended to their table, removed keys deleted.
An inline table stays inline; an array of tables keeps its entries' layout where they match.

Example
-------
>>> text = 'a = "1 m"  # the first\\n[t]\\nb = { c = 1, d = 2 }\\n'
>>> print(merge(text, {"a": "1 m", "t": {"b": {"c": 1, "d": 3}}}), end="")
a = "1 m"  # the first
[t]
b = { c = 1, d = 3 }
"""

from __future__ import annotations

__all__ = ["merge"]


def merge(text: str, doc: dict) -> str:
    """``text`` (TOML) with the values of ``doc`` written into it, comments kept."""
    import tomlkit

    tdoc = tomlkit.parse(text)
    _merge_table(tdoc, doc)
    return tomlkit.dumps(tdoc)


def _plain(value):
    """A tomlkit item as plain Python (for equality)."""
    return value.unwrap() if hasattr(value, "unwrap") else value


def _merge_table(target, new: dict) -> None:
    import tomlkit
    from tomlkit.items import AoT, Array, InlineTable, Table

    for key in [k for k in target.keys() if k not in new]:
        del target[key]
    for key, value in new.items():
        if key not in target:
            target[key] = value
            continue
        old = target[key]
        if _plain(old) == value:
            continue
        if isinstance(value, dict) and isinstance(old, (Table, InlineTable)):
            _merge_table(old, value)
        elif isinstance(value, list) and isinstance(old, AoT) and all(
                isinstance(v, dict) for v in value):
            items = list(old.body)
            if len(items) == len(value):
                for item, v in zip(items, value, strict=True):
                    _merge_table(item, v)
            else:
                aot = tomlkit.aot()
                for v in value:
                    aot.append(v)
                target[key] = aot
        elif isinstance(value, list) and isinstance(old, Array):
            old_plain = _plain(old)
            if len(old_plain) == len(value) and all(
                    isinstance(a, dict) and isinstance(b, dict) for a, b in
                    zip(old_plain, value, strict=True)):
                for i, v in enumerate(value):  # a list of inline tables: keep each inline
                    if old_plain[i] != v:
                        _merge_table(old[i], v)
            else:
                arr = tomlkit.array()
                multiline = "\n" in old.as_string()
                for v in value:
                    arr.append(_inline(v) if isinstance(v, dict) else v)
                if multiline:
                    arr.multiline(True)
                target[key] = arr
        elif isinstance(value, dict) and isinstance(old, InlineTable):
            target[key] = _inline(value)
        else:
            target[key] = value


def _inline(value: dict):
    import tomlkit

    t = tomlkit.inline_table()
    for k, v in value.items():
        t[k] = _inline(v) if isinstance(v, dict) else v
    return t
