"""SARIF 2.1.0 output for ``peakproof check --format sarif`` (OASIS Static Analysis Results Interchange Format).

One run, the rules as ``tool.driver.rules`` (id = our code, name = the readable name), each
finding a result with its region in the checked text and, where a suggestion exists, ``fixes``
carrying the same replacements the formatter applies.
"""

from __future__ import annotations

from typing import Any

SARIF_SCHEMA = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
_LEVEL = {"error": "error", "warning": "warning", "note": "note"}


def _uri(name: str) -> str:
    return name.replace("\\", "/")


def to_sarif(reports: list[tuple[Any, list]], *, version: str) -> dict[str, Any]:
    """``reports``: (source, diagnostics) pairs; ``source`` has ``name`` and ``text``."""
    from .rules import all_rules

    rules = all_rules()
    descriptors: list[dict[str, Any]] = []
    index: dict[str, int] = {}
    for r in rules:
        index[r.name] = len(descriptors)
        descriptors.append({
            "id": r.code,
            "name": r.name,
            "shortDescription": {"text": " ".join((r.__doc__ or r.name).split())},
            "fullDescription": {"text": f"{r.rationale} Source: {r.source}"},
            "defaultConfiguration": {"level": _LEVEL[r.severity]},
            "properties": {"family": r.family},
        })
    results = []
    for source, diagnostics in reports:
        uri = _uri(source.name)
        for d in diagnostics:
            if d.rule not in index:  # parse diagnostics: syntax, repair-*
                index[d.rule] = len(descriptors)
                descriptors.append({"id": d.code or d.rule, "name": d.rule,
                                    "shortDescription": {"text": "reading the data"},
                                    "defaultConfiguration": {"level": _LEVEL[d.severity]}})
            results.append(_result(d, uri, descriptors[index[d.rule]]["id"], index[d.rule]))
    return {
        "$schema": SARIF_SCHEMA,
        "version": "2.1.0",
        "runs": [{
            "tool": {"driver": {"name": "peakproof", "version": version, "rules": descriptors}},
            "columnKind": "unicodeCodePoints",
            "results": results,
        }],
    }


def _region(span) -> dict[str, int]:
    return {
        "startLine": span.line,
        "startColumn": span.column,
        "endLine": span.end_line,
        "endColumn": span.end_column + (1 if span.end > span.start else 0),
        "charOffset": span.start,
        "charLength": span.end - span.start,
    }


def _result(d, uri: str, rule_id: str, rule_index: int) -> dict[str, Any]:
    result: dict[str, Any] = {
        "ruleId": rule_id,
        "ruleIndex": rule_index,
        "level": _LEVEL[d.severity],
        "message": {"text": d.message},
        "locations": [{"physicalLocation": {"artifactLocation": {"uri": uri}, "region": _region(d.span)}}],
    }
    if d.data:
        from .span import _jsonable

        result["properties"] = {"data": _jsonable(d.data)}
    if d.suggestion and d.suggestion.get("replace"):
        result["fixes"] = [{
            "description": {"text": d.suggestion.get("description", "suggested fix")},
            "artifactChanges": [{
                "artifactLocation": {"uri": uri},
                "replacements": [
                    {"deletedRegion": {"charOffset": e["start"], "charLength": e["end"] - e["start"]},
                     "insertedContent": {"text": e["text"]}}
                    for e in d.suggestion["replace"]
                ],
            }],
        }]
    return result
