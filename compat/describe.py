"""``dimfit describe lamp|dimmer``: a profile from a label and a meter reading.

    dimfit describe lamp --watts W --volts V [--not-dimmable] [--pf PF] [--edge leading|trailing]
                         [--meter-w W] [--meter-va VA] [--meter-pf PF] [--amps A] [--crest CF]
                         [--supply-volts V] [--hz HZ] [--name NAME] [--count N] -o FILE [--force] [--json]
    dimfit describe dimmer --watts W --min-watts W --edge leading|trailing --wiring two-wire|with-neutral
                           [--led-watts W] [--control phase|rc-diac] [--trim] [--volts V] [--name NAME]
                           -o FILE [--force] [--json]

The profile is written atomically and never over an existing file unless ``--force``;
it opens with comment lines saying what was read and where each range comes from.
Bad input is one line naming the option and the reason (exit 2).  ``--json`` prints
the ranges (SI, with their units) and their basis.
"""
from __future__ import annotations

import json
import math

from loads.errors import InputError

# Readings field -> the option that sets it (for one-line errors).
LAMP_OPTIONS = {
    "rated_power_w": "--watts", "rated_voltage_v": "--volts", "label_power_factor": "--pf",
    "recommended_edge": "--edge", "supply_voltage_v": "--supply-volts", "meter_power_w": "--meter-w",
    "meter_va": "--meter-va", "meter_power_factor": "--meter-pf", "clamp_current_a": "--amps",
    "crest_factor": "--crest", "frequency_hz": "--hz", "power_factor": "--meter-pf",
    "rms_current_a": "--amps",
}
DIMMER_OPTIONS = {
    "rated_load_w": "--watts", "min_load_w": "--min-watts", "rated_led_w": "--led-watts", "edge": "--edge",
    "wiring": "--wiring", "control": "--control", "voltage_v": "--volts",
}
# Mains frequency when not given (common practice, no source): 60 Hz where the mains is
# 100–130 V, else 50 Hz.
LOW_MAINS_V = 150.0


def _si_unit(key: str) -> str:
    for suffix, unit in (("_ohm", "Ω"), ("_f", "F"), ("_a", "A"), ("_v", "V"), ("_w", "W"), ("_s", "s"), ("_h", "H")):
        if key.endswith(suffix):
            return unit
    return ""


def add_parser(sub) -> None:
    """Add ``describe`` to the command line's subparsers."""
    p = sub.add_parser("describe", help="write a lamp or dimmer profile from its label and a meter reading")
    what = p.add_subparsers(dest="what", parser_class=type(p))
    what.required = True

    lamp = what.add_parser("lamp", help="an LED lamp or driver from its label and plain-switch readings")
    lamp.add_argument("--watts", type=float, required=True, help="printed rated power [W]")
    lamp.add_argument("--volts", type=float, required=True, help="printed rated voltage [V]")
    lamp.add_argument("--not-dimmable", action="store_true", help="the label does not say dimmable")
    lamp.add_argument("--pf", type=float, help="printed power factor")
    lamp.add_argument("--edge", choices=("leading", "trailing"), help="printed recommended dimmer edge")
    lamp.add_argument("--meter-w", type=float, help="plug-in meter: W at full brightness on a plain switch")
    lamp.add_argument("--meter-va", type=float, help="plug-in meter: VA")
    lamp.add_argument("--meter-pf", type=float, help="plug-in meter: PF")
    lamp.add_argument("--amps", type=float, help="true-rms clamp meter: current of this one lamp [A]")
    lamp.add_argument("--crest", type=float, help="crest factor, where the meter shows it")
    lamp.add_argument("--supply-volts", type=float, help="mains voltage during the readings (default: --volts)")
    lamp.add_argument("--hz", type=float, help="mains frequency (default 50 Hz; 60 Hz for 100–130 V lamps)")
    lamp.add_argument("--name", help="the lamp group's name")
    lamp.add_argument("--count", type=int, default=1, help="lamps of this kind on the circuit (default 1)")
    lamp.add_argument("-o", "--output", required=True, metavar="FILE", help="the profile file to write")
    lamp.add_argument("--force", action="store_true", help="replace FILE if it exists")
    lamp.add_argument("--json", action="store_true", help="print the estimated ranges as JSON")
    lamp.set_defaults(func=cmd_describe_lamp)

    dim = what.add_parser("dimmer", help="a wall dimmer from its faceplate or sheet")
    dim.add_argument("--watts", type=float, required=True, help="rated load (filament) [W]")
    dim.add_argument("--min-watts", type=float, required=True, help="printed minimum load [W]")
    dim.add_argument("--edge", choices=("leading", "trailing"), required=True)
    dim.add_argument("--wiring", choices=("two-wire", "with-neutral"), required=True)
    dim.add_argument("--led-watts", type=float, help="LED rating, where printed [W]")
    dim.add_argument("--control", choices=("phase", "rc-diac"),
                     help="phase controller or rotary rc-diac (default: the usual kind for the edge and wiring)")
    dim.add_argument("--trim", action="store_true", help="it has a low-end trim preset")
    dim.add_argument("--volts", type=float, default=230.0, help="the mains it is rated for (default 230 V)")
    dim.add_argument("--name", help="the dimmer's name")
    dim.add_argument("-o", "--output", required=True, metavar="FILE", help="the profile file to write")
    dim.add_argument("--force", action="store_true", help="replace FILE if it exists")
    dim.add_argument("--json", action="store_true", help="print the ranges as JSON")
    dim.set_defaults(func=cmd_describe_dimmer)


def _option_error(err: InputError, options: dict[str, str]) -> InputError:
    return InputError(err.reason, key=options.get(err.key or "", err.key))


def lamp_readings(args):
    """The Readings of a ``describe lamp`` command line (InputError naming the option)."""
    from compat.lamp_label import Readings

    hz = args.hz if args.hz is not None else (60.0 if args.volts is not None and args.volts < LOW_MAINS_V else 50.0)
    try:
        return Readings(rated_power_w=args.watts, rated_voltage_v=args.volts, dimmable=not args.not_dimmable,
                        label_power_factor=args.pf, recommended_edge=args.edge, supply_voltage_v=args.supply_volts,
                        meter_power_w=args.meter_w, meter_va=args.meter_va, meter_power_factor=args.meter_pf,
                        clamp_current_a=args.amps, crest_factor=args.crest, frequency_hz=hz)
    except InputError as err:
        raise _option_error(err, LAMP_OPTIONS) from None


def lamp_name(readings) -> str:
    what = "LED lamp" if readings.dimmable else "LED lamp, not dimmable"
    how = "label and meter" if readings.measured or readings.meter_power_w is not None else "label"
    return f"{what} {readings.rated_power_w:g} W {readings.rated_voltage_v:g} V (from its {how})"


def _header(lines: list[str]) -> str:
    return "".join(f"# {line}\n" for line in lines)


def _readings_lines(r) -> list[str]:
    shown = [("printed", f"{r.rated_power_w:g} W, {r.rated_voltage_v:g} V, "
              + ("dimmable" if r.dimmable else "not dimmable")
              + (f", PF {r.label_power_factor:g}" if r.label_power_factor is not None else "")
              + (f", {r.recommended_edge} edge recommended" if r.recommended_edge else ""))]
    meter = [f"{v:g} {u}" for v, u in ((r.meter_power_w, "W"), (r.meter_va, "VA"), (r.meter_power_factor, "PF"),
                                       (r.clamp_current_a, "A rms (clamp)"), (r.crest_factor, "crest factor"))
             if v is not None]
    if meter:
        shown.append(("measured at full on a plain switch", ", ".join(meter) + f" at {r.voltage_v:g} V {r.frequency_hz:g} Hz"))
    return [f"{a}: {b}" for a, b in shown]


def lamp_profile_text(est, name: str, count: int) -> tuple[str, object, tuple]:
    """The profile file's text for a lamp estimate, the lamp and its ranges."""
    from loads.files import profile_to_toml

    lamp, ranges = est.lamp(name, count)
    lines = ["dimfit describe lamp: a capacitor-input lamp estimated from what could be read and measured.",
             *_readings_lines(est.readings),
             f"{est.points} combinations of the model's parameters agree with these; the ranges below span them.",
             "Where each range comes from:"]
    lines += [f"  {k}: {b}" for k, b in est.basis.items()]
    lines += list(est.notes)
    return _header(lines) + profile_to_toml(lamp, ranges), lamp, ranges


def _json_ranges(ranges, basis: dict[str, str], field_of) -> list[dict]:
    out = []
    for rg in ranges:
        field = field_of(rg)
        out.append({"key": rg.file_key, "min": rg.low, "max": rg.high, "unit": _si_unit(field),
                    "basis": basis.get(field, "")})
    return out


def _write(text: str, path: str, force: bool) -> None:
    from loads.files import write_text_atomic

    try:
        write_text_atomic(path, text, overwrite=force)
    except InputError as err:
        if "already exists" in err.reason:
            raise InputError("already exists; not overwritten (choose another name, or --force to replace it)",
                             file=path) from None
        raise


def cmd_describe_lamp(args) -> int:
    from compat.lamp_label import estimate

    if not 1 <= args.count <= 500:
        raise InputError(f"{args.count} is not a lamp count (1–500)", key="--count")
    readings = lamp_readings(args)
    try:
        est = estimate(readings)
    except InputError as err:
        raise _option_error(err, LAMP_OPTIONS) from None
    name = args.name or lamp_name(readings)
    text, lamp, ranges = lamp_profile_text(est, name, args.count)
    _write(text, args.output, args.force)
    if args.json:
        doc = {"schema": 1, "kind": "lamp", "file": args.output, "name": name, "points": est.points,
               "ranges": _json_ranges(ranges, est.basis, lambda rg: rg.path.split(".", 1)[1]),
               "fixed": {k: v for k, v in est.fixed.items()}, "notes": list(est.notes)}
        print(json.dumps(doc, indent=2, allow_nan=False))
    else:
        print(_summary_lamp(args.output, ranges, est))
    return 0


def _fmt_range(rg) -> str:
    from loads.files import KEYS, unit_of

    key = rg.file_key.rsplit(".", 1)[1]
    k = next((kk for table in KEYS.values() for kk in table.values() if kk.file_key == key), None)
    scale = k.per_si if k is not None else 1.0
    unit = unit_of(k) if k is not None else ""
    return f"{key} {rg.low * scale:.3g}–{rg.high * scale:.3g} {unit}".rstrip()


def _summary_lamp(path: str, ranges, est) -> str:
    lines = [f"wrote {path}: " + "; ".join(_fmt_range(r) for r in ranges)]
    lines += [f"note: {n}" for n in est.notes]
    return "\n".join(lines)


def cmd_describe_dimmer(args) -> int:
    from compat.dimmer_label import Faceplate, estimate
    from loads.files import profile_to_toml

    try:
        face = Faceplate(rated_load_w=args.watts, min_load_w=args.min_watts, edge=args.edge, wiring=args.wiring,
                         rated_led_w=args.led_watts, control=args.control, low_end_trim=args.trim,
                         voltage_v=args.volts)
    except InputError as err:
        raise _option_error(err, DIMMER_OPTIONS) from None
    est = estimate(face)
    name = args.name or (f"{face.wiring} {face.edge}-edge dimmer {face.rated_load_w:g} W (from its faceplate)")
    dimmer, ranges = est.dimmer(name)
    lines = ["dimfit describe dimmer: a dimmer from its faceplate; figures it does not print are ranges.",
             f"printed: {face.rated_load_w:g} W" + (f", LED {face.rated_led_w:g} W" if face.rated_led_w else "")
             + f", minimum {face.min_load_w:g} W, {face.edge} edge, {face.wiring}"
             + (", low-end trim" if face.low_end_trim else ""),
             "Where each range comes from:"]
    lines += [f"  {k}: {b}" for k, b in est.basis.items()]
    lines += list(est.notes)
    text = _header(lines) + profile_to_toml(dimmer, ranges)
    _write(text, args.output, args.force)
    if args.json:
        doc = {"schema": 1, "kind": "dimmer", "file": args.output, "name": name,
               "ranges": _json_ranges(ranges, est.basis, lambda rg: rg.path.split(".", 1)[1]),
               "fixed": {k: (v if not isinstance(v, float) or math.isfinite(v) else None)
                         for k, v in est.fixed.items()}, "notes": list(est.notes)}
        print(json.dumps(doc, indent=2, allow_nan=False))
    else:
        out = [f"wrote {args.output}: " + "; ".join(_fmt_range(r) for r in ranges)]
        out += [f"note: {n}" for n in est.notes]
        print("\n".join(out))
    return 0


# ----------------------------------------------------------------- for the app

def lamp_from_label(*, watts: float, volts: float, dimmable: bool = True, pf: float | None = None,
                    edge: str | None = None, meter_w: float | None = None, meter_va: float | None = None,
                    meter_pf: float | None = None, amps: float | None = None, crest: float | None = None,
                    supply_volts: float | None = None, hz: float | None = None, count: int = 1,
                    name: str | None = None) -> tuple[object, tuple, list[str]]:
    """The lamp group, its ranges (``loads[1].…``) and one line per range, for the app's
    form; InputError names the Readings field (``meter_power_factor``...)."""
    from compat.lamp_label import Readings, estimate

    if hz is None:
        hz = 60.0 if volts < LOW_MAINS_V else 50.0
    readings = Readings(rated_power_w=watts, rated_voltage_v=volts, dimmable=dimmable, label_power_factor=pf,
                        recommended_edge=edge, supply_voltage_v=supply_volts, meter_power_w=meter_w, meter_va=meter_va,
                        meter_power_factor=meter_pf, clamp_current_a=amps, crest_factor=crest, frequency_hz=hz)
    est = estimate(readings)
    lamp, ranges = est.lamp(name or lamp_name(readings), count)
    return lamp, ranges, [_fmt_range(r) for r in ranges] + list(est.notes)


def dimmer_from_faceplate(*, watts: float, min_watts: float, edge: str, wiring: str, led_watts: float | None = None,
                          control: str | None = None, trim: bool = False, volts: float = 230.0,
                          name: str | None = None) -> tuple[object, tuple, list[str]]:
    """The dimmer, its ranges (``dimmer.…``) and one line per range, for the app's form."""
    from compat.dimmer_label import Faceplate, estimate

    face = Faceplate(rated_load_w=watts, min_load_w=min_watts, edge=edge, wiring=wiring, rated_led_w=led_watts,
                     control=control, low_end_trim=trim, voltage_v=volts)
    est = estimate(face)
    dimmer, ranges = est.dimmer(name or f"{wiring} {edge}-edge dimmer {watts:g} W (from its faceplate)")
    return dimmer, ranges, [_fmt_range(r) for r in ranges] + list(est.notes)
