"""The dimming curve: light against setting, dimming down and brightening up.

Drawn from the report's sweep rows (keys in docs/design.md, JSON output).  The markers are read off those
rows for display: where the lamps go out dimming down (drop-out), where they come on
brightening up (pop-on), knob travel that changes nothing (dead travel at either end),
and settings that are not stable (``stable`` as the sweep defines it: every simulated
half-cycle fired, latched and held, with firing angles within 2°).  The judgement of
whether that is acceptable is the ``dimming-range`` check's, shown on the main screen.
"""
from __future__ import annotations

from dataclasses import dataclass, field

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.screen import Screen
from textual.widgets import Footer, Header, Static


# Engineering choice: below 0.5 % of full light a lamp is taken as out for marking.
LIT_FRACTION = 0.005
# Engineering choice: the top 2 % of light is indistinguishable; travel there is dead.
TOP_DEAD_FRACTION = 0.98


def lightness_fraction(light_fraction: float) -> float:
    """CIE 1976 lightness L*/100 of a relative luminance (CIE 15 colorimetry,
    L* = 116·Y^(1/3) − 16 above Y = (6/29)³, else (29/3)³·Y; from memory) [1].  Drawn
    beside the light for comparison; dimfit's "perceived" is the square-root rule
    (``compat.perception``), shown in the reports."""
    y = max(light_fraction, 0.0)
    lightness = 116.0 * y ** (1.0 / 3.0) - 16.0 if y > (6.0 / 29.0) ** 3 else (29.0 / 3.0) ** 3 * y
    return lightness / 100.0


@dataclass
class CurveMarks:
    dropout_setting: float | None = None      # dimming down: first setting with the lamps out
    popon_setting: float | None = None        # brightening up: first setting with light
    bottom_dead_travel: float | None = None   # travel from 0 to the first lit setting, dimming down
    top_dead_travel: float | None = None      # travel at the top within 2 % of full light
    unstable: list[tuple[str, float]] = field(default_factory=list)


def curve_marks(rows) -> CurveMarks:
    marks = CurveMarks()
    down = [r for r in rows if r["direction"] == "down"]
    up = [r for r in rows if r["direction"] == "up"]
    lit_before = False
    for row in down:                          # in the order visited: from full, dimming
        lit = row["light_fraction"] > LIT_FRACTION
        if lit_before and not lit and marks.dropout_setting is None:
            marks.dropout_setting = row["setting"]
        lit_before = lit_before or lit
    lit_down = [r["setting"] for r in down if r["light_fraction"] > LIT_FRACTION]
    if lit_down:
        marks.bottom_dead_travel = min(lit_down)
    for row in up:                            # from the lowest setting, brightening
        if row["light_fraction"] > LIT_FRACTION:
            marks.popon_setting = row["setting"]
            break
    every = down + up
    if every:
        full = max(r["light_fraction"] for r in every)
        if full > LIT_FRACTION:
            near_full = [r["setting"] for r in every if r["light_fraction"] >= TOP_DEAD_FRACTION * full]
            marks.top_dead_travel = 1.0 - min(near_full)
    marks.unstable = [(r["direction"], r["setting"]) for r in every if not r.get("stable", True)]
    return marks


def _setting(value: float | None, none: str = "none") -> str:
    return none if value is None else f"{value:.2f}"


class CurveScreen(Screen):
    BINDINGS = [Binding("escape,q", "app.pop_screen", "Back"), Binding("f8", "cautions", "Cautions")]

    def __init__(self, report, *, stale: bool, cautions: tuple[str, ...]) -> None:
        super().__init__()
        self.report = report
        self.stale = stale
        self.cautions = cautions
        self.rows = list(report.sweep) if report is not None else []
        self.marks = curve_marks(self.rows) if self.rows else None

    def compose(self) -> ComposeResult:
        from tui.waveform_screen import make_plot
        yield Header(show_clock=False, icon="≈")
        with Horizontal(id="curve-body"):
            yield make_plot(id="plot-curve")
            yield Static(self._figures(), id="curve-figures")
        yield Static("Figures are model estimates. F8 cautions.", classes="cautions-line")
        yield Footer()

    def on_mount(self) -> None:
        self.title = "dimfit · dimming curve" + (f" · {self.report.circuit}" if self.report else "")
        if self.rows:
            self._plot()

    def action_cautions(self) -> None:
        from tui.modals import CautionsScreen
        self.app.push_screen(CautionsScreen(self.cautions))

    def _figures(self) -> str:
        if not self.rows:
            return "No dimming curve yet:\nthe checks have not\nfinished (or gave\nno sweep)."
        m = self.marks
        full_from = None if m.top_dead_travel is None else 1.0 - m.top_dead_travel
        lines = ["[b]settings[/b] (0 to 1)",
                 f"goes out ↓ {_setting(m.dropout_setting)}",
                 f"comes on ↑ {_setting(m.popon_setting)}",
                 f"dark below {_setting(m.bottom_dead_travel, '—')}",
                 f"full from  {_setting(full_from, '—')}",
                 f"not stable {len(m.unstable) or 'none'}"]
        for direction, setting in m.unstable[:5]:
            lines.append(f"  {'↓' if direction == 'down' else '↑'} {setting:.2f}")
        if len(m.unstable) > 5:
            lines.append(f"  and {len(m.unstable) - 5} more")
        lines += ["", "↓ turning down,", "↑ turning up;",
                  "none: it never does.", "Not stable: the",
                  "switch misfires or", "its timing wanders.",
                  "", "solid: light", "dots: CIE L*", "x: not stable"]
        if self.stale:
            lines.append("\n(out of date: the\ncircuit has changed)")
        return "\n".join(lines)

    def _plot(self) -> None:
        plot = self.query_one("#plot-curve")
        plt = plot.plt
        plt.clear_data()
        plt.clear_figure()
        for direction, arrow in (("down", "↓"), ("up", "↑")):
            rows = sorted((r for r in self.rows if r["direction"] == direction), key=lambda r: r["setting"])
            if not rows:
                continue
            x = [r["setting"] for r in rows]
            light = [r["light_fraction"] * 100 for r in rows]
            plt.plot(x, light, label=f"light {arrow}", marker="braille")
            plt.plot(x, [lightness_fraction(r["light_fraction"]) * 100 for r in rows],
                     label=f"CIE L* {arrow}", marker="dot")
            bad = [r for r in rows if not r.get("stable", True)]
            if bad:
                plt.scatter([r["setting"] for r in bad], [r["light_fraction"] * 100 for r in bad],
                            marker="x", label=f"not stable {arrow}")
        m = self.marks
        if m.dropout_setting is not None:
            plt.vline(m.dropout_setting)
        if m.popon_setting is not None:
            plt.vline(m.popon_setting)
        plt.xlim(0, 1)
        plt.ylim(0, 100)
        plt.xlabel("setting (0 lowest, 1 full)")
        plt.title("light [% of full]")
        plot.refresh()


def describe_marks(marks: CurveMarks) -> str:
    """One line for tests and logs."""
    return (f"goes out at {_setting(marks.dropout_setting)}, "
            f"comes on at {_setting(marks.popon_setting)}")
