"""``peakproof simulate FILE`` and ``peakproof plot FILE``: the spectrum a description implies."""

from __future__ import annotations

import json
import sys

from .cli import EXIT_OK, EXIT_USAGE

#: Nuclei whose spectra are simulated (spin ½, narrow lines, multiplets reported in full).
SIMULATED_NUCLEI = ("1H", "19F", "31P")
SIMULATE_FORMATS = ("json", "jcamp", "nmredata")


def add_arguments(name, parser) -> None:
    parser.add_argument("file", metavar="FILE",
                        help="a .txt/.md/.tex/.docx/.pdf file, or - for stdin")
    parser.add_argument("--compound", metavar="N", default=None,
                        help="only this compound: its label (e.g. 1a) or its 1-based block number")
    parser.add_argument("--field", type=float, metavar="MHZ", default=None,
                        help="simulate at this 1H frequency instead of the stated one")
    parser.add_argument("--input-format", choices=("txt", "md", "tex", "docx", "pdf"), default=None,
                        help="read the file as this format, whatever its extension")
    if name == "simulate":
        parser.add_argument("--first-order", action="store_true",
                            help="first-order multiplets instead of the exact simulation")
        parser.add_argument("--format", choices=SIMULATE_FORMATS, default="json",
                            help="json: lines and spin systems; jcamp: JCAMP-DX spectra; "
                                 "nmredata: the parsed signals as NMReDATA 1D lines")
        parser.add_argument("--nucleus", choices=SIMULATED_NUCLEI, default=None,
                            help="only spectra of this nucleus")
        parser.add_argument("--points", type=int, default=16384,
                            help="points of the JCAMP-DX spectrum (default 16384)")
    else:
        parser.add_argument("-o", "--output", required=True, metavar="OUT",
                            help="the picture to write: OUT.png or OUT.svg")
        parser.add_argument("--inset", metavar="PPM_LO:PPM_HI", default=None,
                            help="also draw this region enlarged, e.g. 7.0:7.3")
        parser.add_argument("--width", type=int, default=1800, help="width in pixels (1800)")
        parser.add_argument("--height", type=int, default=None,
                            help="height in pixels (900 per compound)")


class _Refusal(Exception):
    """A request that cannot be met; the message says what to do."""


def run(args) -> int:
    from .api import InputError, parse_path
    from .simulate import SpinSystemError

    try:
        _, doc = parse_path(args.file, fmt=args.input_format)
        blocks = select_blocks(doc, args.compound)
        if args.command == "plot":
            return _run_plot(args, blocks)
        if args.format == "nmredata":
            sys.stdout.write(nmredata_text(blocks))
            return EXIT_OK
        items = simulated_spectra(blocks, field=args.field, first_order=args.first_order,
                                  nucleus=args.nucleus)
        if args.format == "jcamp":
            sys.stdout.write("".join(jcamp_text(block, sim, args.points) for block, sim in items))
        else:
            json.dump(simulation_json(doc, items), sys.stdout, ensure_ascii=False, indent=1)
            sys.stdout.write("\n")
        return EXIT_OK
    except (InputError, _Refusal, SpinSystemError) as exc:
        print(f"peakproof {args.command}: {exc}", file=sys.stderr)
        return EXIT_USAGE


def select_blocks(doc, compound: str | None) -> list:
    """The blocks ``compound`` names (a label first, then a 1-based number); all without it."""
    if not doc.blocks:
        raise _Refusal("no characterization data found in the file")
    if compound is None:
        return list(doc.blocks)
    wanted = compound.strip()
    for test in (lambda b: b.compound == wanted,
                 lambda b: (b.compound or "").casefold() == wanted.casefold()):
        found = [b for b in doc.blocks if test(b)]
        if found:
            return found
    if wanted.isdigit() and 1 <= int(wanted) <= len(doc.blocks):
        return [doc.blocks[int(wanted) - 1]]
    labels = ", ".join(b.compound for b in doc.blocks if b.compound) or "none"
    raise _Refusal(f"no compound {wanted!r}: give a label ({labels}) or a number from 1 to "
                   f"{len(doc.blocks)}")


def _name(block) -> str:
    return f"compound {block.compound}" if block.compound else f"block {block.index + 1}"


def simulated_spectra(blocks, *, field=None, first_order=False, nucleus=None,
                      nuclei=SIMULATED_NUCLEI) -> list:
    """(block, ImpliedSimulation) for every simulated spectrum of ``blocks``."""
    from .simulate.from_model import implied_spectrum, simulate_implied

    method = "first-order" if first_order else "quantum"
    items = []
    for block in blocks:
        for spectrum in block.spectra:
            if spectrum.nucleus not in nuclei or (nucleus and spectrum.nucleus != nucleus):
                continue
            if not spectrum.signals:
                continue
            observe = None
            if field is not None:
                from .nuclei import expected_frequency

                observe = expected_frequency(spectrum.nucleus, field)
            implied = implied_spectrum(spectrum, field_mhz=observe)
            items.append((block, simulate_implied(implied, method)))
    if not items:
        what = nucleus or "1H, 19F or 31P"
        where = ", ".join(_name(b) for b in blocks[:5]) + (" …" if len(blocks) > 5 else "")
        raise _Refusal(f"no {what} NMR data with signals in {where}")
    return items


def simulation_json(doc, items) -> dict:
    compounds: dict[int, dict] = {}
    for block, sim in items:
        entry = compounds.setdefault(block.index, {
            "compound": block.compound, "block": block.index + 1, "spectra": []})
        implied = sim.implied
        entry["spectra"].append({
            "nucleus": implied.nucleus,
            "field_mhz": implied.field_mhz,
            "solvent": implied.solvent,
            "method": sim.method,
            "spin_system": implied.system_json(),
            "notes": list(sim.simulation.notes),
            "lines": [{"offset_hz": round(ln.freq_hz, 4), "ppm": round(ln.ppm, 6),
                       "intensity": round(ln.intensity, 6)} for ln in sim.simulation.lines],
        })
    return {"schema": "peakproof-simulate/1", "path": doc.path,
            "compounds": list(compounds.values())}


def drawing_grid(sim, points: int, margin_ppm: float = 0.5):
    """A high-to-low ppm grid covering every line and every drawn signal."""
    from .simulate.lineshape import ppm_grid

    shifts = [ln.ppm for ln in sim.simulation.lines]
    for s in sim.implied.signals:
        shifts.extend(s.range_ppm or (s.shift_ppm,))
    return ppm_grid(max(shifts) + margin_ppm, min(shifts) - margin_ppm, points)


def jcamp_text(block, sim, points: int = 16384) -> str:
    from .jcamp import write_jcamp

    if points < 16:
        raise _Refusal(f"--points must be at least 16, got {points}")
    grid = drawing_grid(sim, points)
    implied = sim.implied
    title = f"{_name(block)}: simulated {implied.nucleus} NMR ({sim.method})"
    return write_jcamp(
        grid.tolist(), sim.curve(grid).tolist(),
        observe_frequency_mhz=implied.field_mhz, nucleus=implied.nucleus, title=title,
        solvent=implied.solvent,
        peaks=[(ln.ppm, ln.intensity) for ln in sim.simulation.lines],
    )


def nmredata_text(blocks) -> str:
    """The parsed signals of every spectrum as NMReDATA 1D tags (no structure needed)."""
    from .jcamp import nmredata_1d_lines

    out = []
    for block in blocks:
        for spectrum in block.spectra:
            if not spectrum.signals:
                continue
            out.append(f"$$ {_name(block)}\n")
            # Tag name and the Larmor/Decoupled lines as in the NMReDATA format (from memory).
            out.append(f"> <NMREDATA_1D_{spectrum.nucleus}>\n")
            if spectrum.frequency_mhz:
                out.append(f"Larmor={spectrum.frequency_mhz:g}\\\n")
            if spectrum.decoupled:
                out.append(f"Decoupled={','.join(spectrum.decoupled)}\\\n")
            signals = []
            for s in spectrum.signals:
                if s.shift is None and s.range is None:
                    continue
                shift = tuple(s.range) if s.range else s.shift
                signals.append((shift, s.multiplicity.name if s.multiplicity else None,
                                s.j_hz, s.count, s.assignment))
            out.append(nmredata_1d_lines(signals))
            out.append("\n")
    if not out:
        raise _Refusal("no NMR signals in the selected data")
    return "".join(out)


def _parse_inset(text: str | None) -> tuple[float, float] | None:
    if text is None:
        return None
    try:
        low, high = (float(part.replace("−", "-")) for part in text.split(":"))
    except ValueError:
        raise _Refusal(
            f"--inset {text!r}: write two shifts in ppm as LO:HI, e.g. 7.0:7.3") from None
    if low == high:
        raise _Refusal(f"--inset {text!r}: the two shifts must differ")
    return (min(low, high), max(low, high))


def _refuse_oversized_picture(args, blocks) -> None:
    """Refuse, before any simulation, a picture too large to draw (many compounds at the default
    900 px each), pointing to ``--compound``."""
    from .plot import HEIGHT_RANGE_PX, PANEL_HEIGHT_PX, size_problem

    panels = sum(1 for b in blocks for s in b.spectra if s.nucleus == "1H" and s.signals)
    height = args.height or PANEL_HEIGHT_PX * panels
    problem = size_problem(args.width, height)
    if problem is None:
        return
    if args.height is None and panels > 1:
        labels = [b.compound for b in blocks if b.compound][:3]
        example = f" (e.g. --compound {labels[0]})" if labels else " (e.g. --compound 1)"
        most = HEIGHT_RANGE_PX[1] // PANEL_HEIGHT_PX
        raise _Refusal(f"{panels} 1H spectra would make a picture {height} pixels high, more than "
                       f"the {HEIGHT_RANGE_PX[1]} allowed; choose one compound with --compound{example}, "
                       f"or plot at most {most} at a time")
    raise _Refusal(problem)


def _run_plot(args, blocks) -> int:
    from .plot import PlotError, plot_spectra

    inset = _parse_inset(args.inset)
    if not str(args.output).lower().endswith((".png", ".svg")):
        raise _Refusal(f"{args.output}: the picture must be a .png or .svg file")
    _refuse_oversized_picture(args, blocks)
    exact = simulated_spectra(blocks, field=args.field, nuclei=("1H",))
    first = simulated_spectra(blocks, field=args.field, nuclei=("1H",), first_order=True)
    panels = [(_name(block), q, f) for (block, q), (_, f) in zip(exact, first)]
    height = args.height or 900 * len(panels)
    try:
        plot_spectra(panels, args.output, width_px=args.width, height_px=height, inset=inset)
    except PlotError as exc:
        raise _Refusal(str(exc)) from None
    except OSError as exc:
        raise _Refusal(f"{args.output}: {exc.strerror or exc}") from None
    print(f"wrote {args.output} ({len(panels)} spectrum/spectra)", file=sys.stderr)
    return EXIT_OK
