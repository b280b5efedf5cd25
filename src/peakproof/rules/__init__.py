"""The checker's rules: each declared once, as a class that registers itself.

A rule is a subclass of :class:`Rule` with a readable ``name`` (kebab-case), a short ``code``
of our own (``PP`` + three digits), a default ``severity``, a ``message`` template (filled with
the keyword arguments a finding passes), a ``rationale`` naming its ``source`` (a citation or
"common practice"), ``examples`` (``("pass", text)`` / ``("fail", text)`` pairs; the test suite
runs every one) and a ``check(block, ctx)`` generator yielding :class:`Diagnostic` objects made
with :meth:`Rule.finding`.  Rules with ``scope = "document"`` get ``check_document(doc, ctx)``.

Defining the class is enough: ``__init_subclass__`` puts it in :data:`REGISTRY`.  The family
modules are imported by :func:`all_rules`, so ``import peakproof`` stays light.
"""

from __future__ import annotations

import difflib
import importlib
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field
from typing import Any, ClassVar

from ..span import Diagnostic, Span

FAMILIES = (
    "multiplicity",
    "coupling",
    "reciprocity",
    "splitting",
    "second_order",
    "integration",
    "carbon",
    "decoupled",
    "frequency",
    "solvent",
    "mass_spec",
    "analysis",
    "form",
    "consistency",
    "structure",
)

#: rule name → rule class, in registration order
REGISTRY: dict[str, type[Rule]] = {}
_BY_CODE: dict[str, type[Rule]] = {}


class RuleDefinitionError(TypeError):
    """A rule class that is missing part of its declaration, or reuses a name or code."""


class Rule:
    """Base class of every rule; subclasses declare the attributes below and ``check``."""

    name: ClassVar[str] = ""
    code: ClassVar[str] = ""
    severity: ClassVar[str] = "warning"
    family: ClassVar[str] = ""
    message: ClassVar[str] = ""
    rationale: ClassVar[str] = ""
    source: ClassVar[str] = ""
    #: ("pass" | "fail", text) or ("pass" | "fail", text, formula given as with --formula)
    examples: ClassVar[tuple[tuple[str, ...], ...]] = ()
    scope: ClassVar[str] = "block"  # "block" or "document"

    def __init_subclass__(cls, **kwargs: Any) -> None:
        super().__init_subclass__(**kwargs)
        if not cls.name:  # an intermediate helper class
            return
        missing = [a for a in ("code", "message", "rationale", "source") if not getattr(cls, a)]
        if missing:
            raise RuleDefinitionError(f"rule {cls.name}: missing {', '.join(missing)}")
        if cls.severity not in ("error", "warning", "note"):
            raise RuleDefinitionError(f"rule {cls.name}: severity {cls.severity!r}")
        if not (len(cls.code) == 5 and cls.code.startswith("PP") and cls.code[2:].isdigit()):
            raise RuleDefinitionError(f"rule {cls.name}: code {cls.code!r} is not PP + 3 digits")
        kinds = {example[0] for example in cls.examples}
        if not {"pass", "fail"} <= kinds or not kinds <= {"pass", "fail"}:
            raise RuleDefinitionError(f"rule {cls.name}: needs pass and fail examples")
        for table, key in ((REGISTRY, cls.name), (_BY_CODE, cls.code)):
            if key in table and table[key].__qualname__ != cls.__qualname__:
                raise RuleDefinitionError(f"rule {key} declared twice")
        if not cls.family:
            cls.family = cls.__module__.rsplit(".", 1)[-1]
        REGISTRY[cls.name] = cls
        _BY_CODE[cls.code] = cls

    # -- running -----------------------------------------------------------------------------
    def __init__(self, severity: str | None = None):
        self.effective_severity = severity or self.severity

    def check(self, block, ctx: Context) -> Iterator[Diagnostic]:  # pragma: no cover - abstract
        return iter(())

    def check_document(self, document, ctx: Context) -> Iterator[Diagnostic]:
        return iter(())

    def finding(
        self,
        span: Span,
        *,
        data: dict[str, Any] | None = None,
        suggestion: dict[str, Any] | None = None,
        severity: str | None = None,
        **message_args: Any,
    ) -> Diagnostic:
        """A diagnostic of this rule at ``span``; ``message_args`` fill the message template."""
        return Diagnostic(
            rule=self.name,
            code=self.code,
            severity=severity or self.effective_severity,
            message=self.message.format(**message_args),
            span=span,
            data=data or {},
            suggestion=suggestion,
        )

    @classmethod
    def documentation(cls) -> str:
        """The rule's documentation as printed by ``peakproof explain``."""
        lines = [
            f"{cls.name} ({cls.code}), default severity {cls.severity}, family {cls.family}",
            "",
            f"Reports: {cls.message}",
            "",
            cls.rationale,
            f"Source: {cls.source}",
        ]
        if cls.__doc__:
            lines[1:1] = ["", " ".join(cls.__doc__.split())]
        lines.append("")
        lines.append("Examples:")
        for kind, text, *formula in cls.examples:
            given = f"   (with --formula {formula[0]})" if formula else ""
            lines.append(f"  {kind}: {text}{given}")
        return "\n".join(lines)


def suggestion(description: str, *edits: tuple[int, int, str]) -> dict[str, Any]:
    """The machine-readable fix shape: document offsets, applied right to left."""
    return {
        "description": description,
        "replace": [{"start": s, "end": e, "text": t} for s, e, t in edits],
    }


@dataclass
class Context:
    """What a rule may consult besides the block: settings, the formula, shared networks."""

    document: Any
    config: Any
    formula: Any = None  # peakproof.formula.Formula of the neutral compound, or None
    formula_source: str | None = None
    formula_span: Span | None = None
    independent_formula: Any = None  # the formula from a source other than HRMS, for judging HRMS
    index: Any = None  # LineIndex of the document
    structure: Any = None  # structures.Structure of the block's compound, or None
    _networks: dict[int, Any] = field(default_factory=dict)
    _shared: dict[Any, Any] = field(default_factory=dict)

    def shared(self, name: str, about, compute):
        """``compute()`` once per fact ``name`` about the object ``about`` (a block, a spectrum):
        facts that several rules consult are worked out once."""
        key = (name, id(about))
        held = self._shared.get(key)
        if held is not None and held[0] is about:
            return held[1]
        value = compute()
        self._shared[key] = (about, value)  # holding ``about`` keeps its id from being reused
        return value

    def network(self, spectrum):
        """The coupling network of ``spectrum`` (computed once, shared by rules and output)."""
        key = id(spectrum)
        net = self._networks.get(key)
        if net is None:
            from ..network import build_network

            net = build_network(spectrum, self.config.coupling_tolerance)
            self._networks[key] = (spectrum, net)
            return net
        return net[1]

    def span(self, start: int, end: int) -> Span:
        return self.index.span(start, end)

    def number_span(self, span: Span, number_text: str) -> Span:
        """The span of ``number_text`` where it last occurs inside ``span`` (a J's number)."""
        excerpt = self.document.text[span.start : span.end]
        at = excerpt.rfind(number_text) if number_text else -1
        if at < 0:
            return span
        return self.index.span(span.start + at, span.start + at + len(number_text))


_loaded = False


def all_rules() -> list[type[Rule]]:
    """Every registered rule class, importing the family modules on first use."""
    global _loaded
    if not _loaded:
        for family in FAMILIES:
            importlib.import_module(f"{__name__}.{family}")
        _loaded = True
    return list(REGISTRY.values())


def rule_for(name_or_code: str) -> type[Rule]:
    """Look a rule up by name or code; ``KeyError`` with a close-match suggestion otherwise."""
    all_rules()
    key = name_or_code.strip()
    if key in REGISTRY:
        return REGISTRY[key]
    if key.upper() in _BY_CODE:
        return _BY_CODE[key.upper()]
    close = difflib.get_close_matches(key, list(REGISTRY) + list(_BY_CODE), n=3, cutoff=0.6)
    hint = f"; did you mean {', '.join(close)}?" if close else "; 'peakproof rules' lists them"
    raise KeyError(f"unknown rule {key!r}{hint}")


def resolve_names(names: Iterable[str]) -> set[str]:
    """Rule names for a mix of names, codes and family names (a family selects all its rules)."""
    all_rules()
    out: set[str] = set()
    for raw in names:
        key = raw.strip()
        if not key:
            continue
        family = [r.name for r in REGISTRY.values() if r.family == key.replace("-", "_")]
        if family:
            out.update(family)
            continue
        out.add(rule_for(key).name)
    return out


__all__ = [
    "Context",
    "FAMILIES",
    "REGISTRY",
    "Rule",
    "RuleDefinitionError",
    "all_rules",
    "resolve_names",
    "rule_for",
    "suggestion",
]
