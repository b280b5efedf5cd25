"""Run the rules over a parsed document: ``check(document, config=None, formula=None)``.

Findings are :class:`~peakproof.span.Diagnostic` objects, sorted by position, with the parse
diagnostics (``syntax``, ``repair-*``) included so one report covers both.  Inline markers
(``peakproof: ignore rule-a, PP101``) silence rules for one block; ``select``/``ignore`` and
severity overrides come from :class:`~peakproof.config.Config`.
"""

from __future__ import annotations

from typing import Any

from .collector import collector_paused
from .config import Config
from .formula import FormulaError
from .masses import formula_is_neutral_then_ion
from .rules._util import formula as parse_formula
from .rules._util import neutral_of as neutral_from_ion
from .span import Diagnostic, LineIndex

_SEVERITY_RANK = {"error": 0, "warning": 1, "note": 2}


class CheckResult:
    """Findings of one document and the coupling networks the rules used.

    ``networks`` (plain JSON data, one entry per spectrum) is made on first use: only the JSON
    report prints it, and building it for every check would cost a good part of the checking.
    """

    __slots__ = ("diagnostics", "_networks", "_pending")

    def __init__(self, diagnostics: list[Diagnostic], networks: list[dict[str, Any]] | None = None,
                 *, pending: list | None = None):
        self.diagnostics = diagnostics
        self._networks = networks
        # (block index, spectrum index, spectrum, Context that may already hold its network)
        self._pending = pending or []

    @property
    def networks(self) -> list[dict[str, Any]]:
        if self._networks is None:
            self._networks = [{"block": b, "spectrum": k, **ctx.network(spectrum).to_json()}
                              for b, k, spectrum, ctx in self._pending]
            self._pending = []
        return self._networks

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, CheckResult):
            return NotImplemented
        return (self.diagnostics, self.networks) == (other.diagnostics, other.networks)

    def __repr__(self) -> str:
        return f"CheckResult(diagnostics={self.diagnostics!r}, networks={self.networks!r})"


def at_or_above(severity: str, threshold: str) -> bool:
    return _SEVERITY_RANK[severity] <= _SEVERITY_RANK[threshold]


def check(document, config: Config | None = None, formula: str | None = None) -> list[Diagnostic]:
    """Every finding for ``document`` (parse diagnostics included), in text order."""
    return check_document(document, config, formula).diagnostics


def check_document(document, config: Config | None = None, formula: str | None = None, *,
                   strict: bool = False, structures=None) -> CheckResult:
    """Findings plus the coupling networks; ``strict`` lets a failing rule raise (for tests).

    ``structures``: block index → ``structures.Structure`` from a side file (see
    ``structures.match_structures``); a structure written in the document itself comes first."""
    # As in the parser: the findings have no reference cycles, and the collector's full scans of
    # a large parsed document would cost more than the rules.
    with collector_paused():
        return _check_document(document, config, formula, strict, structures)


def _check_document(document, config, formula, strict, structures=None) -> CheckResult:
    from .rules import Context, all_rules, resolve_names
    from .structures import inline_structures

    config = config or Config()
    if formula is not None:
        config = config.with_overrides(formula=formula)
    rules = _enabled_rules(all_rules(), config, resolve_names)
    index = LineIndex(document.text)
    findings: list[Diagnostic] = list(_filtered_parse_diagnostics(document, config, resolve_names))
    pending: list = []
    neutral_override = _override_formula(config)
    block_rules = [rule for rule in rules if rule.scope == "block"]
    by_block = {**(structures or {}), **inline_structures(document)}
    for block in document.blocks:
        ctx = Context(document=document, config=config, index=index, structure=by_block.get(block.index))
        try:
            ctx.formula, ctx.formula_source, ctx.formula_span = block_formula(block, neutral_override, index)
            # without HRMS the search finds the same formula again unless HRMS was its source
            ctx.independent_formula = ctx.formula if ctx.formula_source != "HRMS" else \
                block_formula(block, neutral_override, index, independent=True)[0]
        except Exception as exc:  # a bug in the formula search: say so at this block, go on
            if strict:
                raise
            findings.append(_internal_error(_FormulaSearch, block, ctx, exc))
            continue
        silenced = _suppressed(block, resolve_names) if block.suppressed else ()
        for rule in block_rules:
            if rule.name not in silenced:
                _run_into(findings, rule, block, ctx, strict)
        pending.extend((block.index, k, spectrum, ctx) for k, spectrum in enumerate(block.spectra))
    doc_ctx = Context(document=document, config=config, index=index)
    for rule in rules:
        if rule.scope == "document":
            findings.extend(
                d for d in _run(rule, rule.check_document, document, doc_ctx, strict)
                if rule.name not in _suppressed_at(document, d.span.start, resolve_names)
            )
    findings.sort(key=lambda d: (d.span.start, _SEVERITY_RANK[d.severity], d.rule))
    return CheckResult(findings, pending=pending)


def _run(rule, method, target, ctx, strict: bool) -> list[Diagnostic]:
    try:
        return list(method(target, ctx))
    except Exception as exc:  # a rule bug must not hide the other findings
        if strict:
            raise
        return [_internal_error(rule, target, ctx, exc)]


def _run_into(findings: list[Diagnostic], rule, block, ctx, strict: bool) -> None:
    """``_run`` of a block rule, its findings added to ``findings`` (all of them or none)."""
    mark = len(findings)
    cap = ctx.config.max_findings_per_rule
    try:
        if not cap:
            findings.extend(rule.check(block, ctx))
        else:
            more, first_more = 0, None
            for finding in rule.check(block, ctx):
                if len(findings) - mark < cap:
                    findings.append(finding)
                else:
                    more += 1
                    first_more = first_more or finding
            if more:
                findings.append(_more_like_this(rule, first_more, more, cap))
    except Exception as exc:  # a rule bug must not hide the other findings
        del findings[mark:]
        if strict:
            raise
        findings.append(_internal_error(rule, block, ctx, exc))


class _FormulaSearch:  # stands for a rule in the internal-error message
    name = "formula search"


def _more_like_this(rule, first: Diagnostic, more: int, cap: int) -> Diagnostic:
    """The one finding that stands for the ``more`` findings of ``rule`` past the cap in a block;
    it sits where the first of them would have been."""
    return Diagnostic(rule=rule.name, severity=first.severity, span=first.span, code=rule.code,
                      message=f"and {more} more like this from {rule.name} in this block, not listed "
                              f"(at most {cap} are listed a rule and block; the setting "
                              "max-findings-per-rule raises the limit, 0 lists all)",
                      data={"more": more, "cap": cap})


def _internal_error(rule, target, ctx, exc: Exception) -> Diagnostic:
    span = target.span if hasattr(target, "span") else LineIndex(ctx.document.text).span(0, 0)
    return Diagnostic(rule="internal-error", severity="note", span=span, code="",
                      message=f"rule {rule.name} could not run here ({type(exc).__name__}: {exc}); "
                              "please report this with the text that caused it")


def _enabled_rules(classes, config: Config, resolve_names) -> list:
    selected = resolve_names(config.select) if config.select else {c.name for c in classes}
    ignored: set[str] = set()
    for key in config.ignore:
        try:
            ignored |= resolve_names([key])
        except KeyError:
            continue  # "syntax", "repair-*": parse diagnostics, filtered separately
    overrides: dict[str, str] = {}
    for key, severity in config.severity.items():
        for name in resolve_names([key]):
            overrides[name] = severity
    return [c(overrides.get(c.name)) for c in classes if c.name in selected and c.name not in ignored]


def _filtered_parse_diagnostics(document, config: Config, resolve_names):
    ignored = set()
    for key in config.ignore:
        try:
            ignored |= resolve_names([key])
        except KeyError:
            ignored.add(key)  # "syntax" and "repair-*" are not registered rules
    for d in document.diagnostics:
        if d.rule not in ignored and not (d.rule.startswith("repair-") and "repair" in ignored):
            yield d


def _suppressed(block, resolve_names) -> set[str]:
    names: set[str] = set()
    for key in block.suppressed:
        try:
            names |= resolve_names([key])
        except KeyError:
            continue  # an unknown name in a marker silences nothing
    return names


def _suppressed_at(document, offset: int, resolve_names) -> set[str]:
    for block in document.blocks:
        if block.span.start <= offset < block.span.end:
            return _suppressed(block, resolve_names)
    return set()


def _override_formula(config: Config):
    if not config.formula:
        return None
    from .formula import parse_formula

    return parse_formula(config.formula).neutral()


def _decimals_of(text: str) -> int:
    return len(text) - text.index(".") - 1 if "." in text else 0


def block_formula(block, override=None, index: LineIndex | None = None, *, independent: bool = False):
    """(neutral Formula, where it came from, span) for a block; (None, None, None) when unknown.

    Order: ``--formula``, the HRMS ion formula minus the adduct, the elemental-analysis formula,
    the formula written by the compound.  ``independent`` skips HRMS (to judge the HRMS formula).
    """
    if override is not None:
        return override, "--formula", None
    if not independent:
        for ms in block.mass_spec:
            if ms.formula and ms.ion:
                try:
                    if ms.calcd is not None and ms.calcd_text and formula_is_neutral_then_ion(
                            ms.formula, ms.ion, ms.calcd, _decimals_of(ms.calcd_text)):
                        return parse_formula(ms.formula).neutral(), "HRMS", ms.formula_span
                    return neutral_from_ion(ms.formula, ms.ion), "HRMS", ms.formula_span
                except FormulaError:
                    continue
    for analysis in block.analyses:
        if analysis.formula:
            try:
                return parse_formula(analysis.formula).neutral(), "elemental analysis", analysis.formula_span
            except FormulaError:
                continue
    if block.formula:
        try:
            span = None
            at = block.text.find(block.formula)
            if at >= 0 and index is not None:
                start = block.span.start + at
                span = index.span(start, start + len(block.formula))
            return parse_formula(block.formula).neutral(), "compound", span
        except FormulaError:
            pass
    return None, None, None


__all__ = ["CheckResult", "at_or_above", "block_formula", "check", "check_document"]
