"""The published schema compiled to plain Python checks: a fast yes/no.

Almost every spec is valid, so ``schema.validate`` asks this compiled check
first and runs jsonschema (imported only then) just for documents it rejects,
to get jsonschema's ranked, located messages.  The compiler is built from the
schema file itself, so the file stays the one source, and it refuses any
keyword it does not implement: a schema change that needs more fails loudly
in the tests (``test_schema.py`` also checks the two agree on a corpus).
"""

from __future__ import annotations

from typing import Callable

ANNOTATIONS = {"$schema", "$id", "title", "description", "$defs", "$comment", "default", "examples"}
KEYWORDS = {"$ref", "type", "const", "enum", "anyOf", "minLength", "maxLength", "properties",
            "additionalProperties", "required", "minProperties", "maxProperties", "items",
            "unevaluatedProperties", "exclusiveMinimum"}

_TYPES: dict[str, Callable[[object], bool]] = {
    "string": lambda x: isinstance(x, str),
    "number": lambda x: isinstance(x, (int, float)) and not isinstance(x, bool),
    "integer": lambda x: isinstance(x, int) and not isinstance(x, bool),
    "object": lambda x: isinstance(x, dict),
    "array": lambda x: isinstance(x, list),
    "boolean": lambda x: isinstance(x, bool),
    "null": lambda x: x is None,
}


def _same(a, b) -> bool:
    return a == b and isinstance(a, bool) == isinstance(b, bool)


def compile_schema(root: dict) -> Callable[[object], bool]:
    defs: dict[str, Callable] = {}

    def target(ref: str) -> dict:
        return root["$defs"][ref.rsplit("/", 1)[1]]

    def evaluated(s: dict) -> set:
        """Property names a subschema evaluates, through $ref (all unevaluatedProperties needs here)."""
        names = set(s.get("properties", {}))
        if "$ref" in s:
            names |= evaluated(target(s["$ref"]))
        return names

    def comp(s: dict) -> Callable[[object], bool]:
        unknown = set(s) - ANNOTATIONS - KEYWORDS
        if unknown:
            raise ValueError(f"schema keywords not compiled: {sorted(unknown)}")
        checks: list[Callable[[object], bool]] = []
        if "$ref" in s:
            name = s["$ref"].rsplit("/", 1)[1]
            checks.append(lambda x: defs[name](x))
        if "type" in s:
            types = [_TYPES[t] for t in (s["type"] if isinstance(s["type"], list) else [s["type"]])]
            checks.append(lambda x: any(t(x) for t in types))
        if "const" in s:
            const = s["const"]
            checks.append(lambda x: _same(x, const))
        if "enum" in s:
            enum = s["enum"]
            checks.append(lambda x: any(_same(x, v) for v in enum))
        if "minLength" in s or "maxLength" in s:
            lo, hi = s.get("minLength", 0), s.get("maxLength", float("inf"))
            checks.append(lambda x: not isinstance(x, str) or lo <= len(x) <= hi)
        if "exclusiveMinimum" in s:
            bound = s["exclusiveMinimum"]
            checks.append(lambda x: not _TYPES["number"](x) or x > bound)
        if "anyOf" in s:
            options = [comp(x) for x in s["anyOf"]]
            checks.append(lambda x: any(f(x) for f in options))
        if "items" in s:
            item = comp(s["items"])
            checks.append(lambda x: not isinstance(x, list) or all(item(v) for v in x))
        props = {k: comp(v) for k, v in s.get("properties", {}).items()}
        extra = s.get("additionalProperties", True)
        extra_check = comp(extra) if isinstance(extra, dict) else None
        closed = extra is False
        allowed = evaluated(s) if s.get("unevaluatedProperties", True) is False else None
        required = tuple(s.get("required", ()))
        min_props, max_props = s.get("minProperties", 0), s.get("maxProperties", float("inf"))
        if props or closed or extra_check or allowed is not None or required or min_props or "maxProperties" in s:
            def obj(x) -> bool:
                if not isinstance(x, dict):
                    return True
                if not min_props <= len(x) <= max_props or any(r not in x for r in required):
                    return False
                for k, v in x.items():
                    f = props.get(k)
                    if f is not None:
                        if not f(v):
                            return False
                    elif extra_check is not None:
                        if not extra_check(v):
                            return False
                    elif closed or (allowed is not None and k not in allowed):
                        return False
                return True
            checks.append(obj)
        if len(checks) == 1:
            return checks[0]
        return lambda x: all(c(x) for c in checks)

    for name, sub in root.get("$defs", {}).items():
        defs[name] = comp(sub)
    return comp(root)
