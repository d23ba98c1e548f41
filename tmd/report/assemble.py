"""One call per job: the report files of a results dictionary.

:func:`render_report` returns ``{"report.html": ..., "figures/<name>.png": ...,
"tables/<name>.csv": ...}`` (bytes), for :func:`tmd.outputs.write_all` to write
beside results.json. Sections appear for whatever the results hold: the wind
(``by_return_period``, ``across_wind``), robustness (``sweep``, ``sweep_bare``,
``band_design``, ``probabilistic``) and options (``options``) parts are
rendered when present and skipped when absent.
"""

from __future__ import annotations

import numpy as np

from tmd.defaults import FREQUENCY_BAND
from tmd.report import plots, series
from tmd.report.acrosswind import across_wind_section
from tmd.report.comfort import comfort_limits
from tmd.report.extremes import end_stop_tables, recommendation_blocks
from tmd.report.html import Callout, Figure, Section, document
from tmd.report.progress import StepCallback, quiet_step
from tmd.report.tables import (
    DAMPER_LABELS,
    MILLI_G,
    Cell,
    Table,
    across_table,
    by_period_table,
    csv_bytes,
    key_value_table,
    label_and_unit,
    record_table,
    retuning_table,
)
from tmd.schema import DESIGN_REPORT_ORDER
from tmd.side_by_side import side_by_side

SWEEP_TITLES = (
    ("sweep", "Detuning sweep of the design (structure frequency factor)"),
    ("sweep_bare", "Detuning sweep of the bare building"),
    ("sweep_damper_frequency", "Damper spring off its design value (damper frequency factor)"),
    ("sweep_damper_damping", "Damper dashpot off its design value (damper damping factor)"),
)
CONVENTIONS = (
    "SI units throughout; frequencies in Hz.",
    "Power spectral densities are one-sided per Hz: the variance is the integral of S(f) "
    "from 0 to infinity.",
    "Mass ratio = damper mass / modal mass M*, with the mode shape equal to 1 at the damper.",
    "Frequency ratio = damper frequency / structure frequency; the damper's damping ratio is "
    "referred to the damper's own frequency.",
    "Stroke = damper displacement relative to the structure at the damper; a peak stroke is "
    "one-sided (end-stop travel is ± that value).",
    "Accelerations are at the evaluation height; peaks are peak factor × rms over the stated "
    "duration.",
    "Numbers in tables are printed to 4 significant figures; each cell carries its results.json "
    "key and full value.",
)


def comfort_caption(shown, hidden, responses) -> str:
    """Return what the comfort chart draws: which responses, which limits, which have no limit.

    Parameters
    ----------
    shown, hidden : list of ComfortLimit
        Shipped limits drawn (a response of their return period exists) and not drawn.
    responses : list of ComfortResponse
        The responses drawn, per return period.

    Returns
    -------
    str
    """
    def period(p):
        return "the design load (return period not stated)" if p is None else f"{p:g}-year"

    periods = [r.return_period_years for r in responses]
    limited = {c.return_period_years for c in shown}
    damped = any(r.damped_peak_m_s2 is not None for r in responses)
    text = ("Peak acceleration at the building frequency, bare (open markers)"
            + (" and with the damper (filled)" if damped else "") + ", for "
            + ", ".join(period(p) for p in periods) + " loads, beside the user's target.")
    if shown:
        text += " Comfort limits drawn: " + "; ".join(c.label for c in shown) + "."
    unmatched = [p for p in periods if p not in limited]
    if unmatched:
        text += (" No shipped limit has the return period of the "
                 + ", ".join(period(p) for p in unmatched)
                 + " points: they are drawn for reference only, against no limit.")
    if hidden:
        text += (" Not drawn, for want of a response of their return period: "
                 + "; ".join(c.label for c in hidden) + ".")
    return text


def render_report(results: dict, *, dpi: int = 150,
                  wind_spectrum: tuple | None = None,
                  on_step: StepCallback = quiet_step) -> dict[str, bytes]:
    """Return the HTML report, its figures (PNG) and key tables (CSV) for one job's results.

    Parameters
    ----------
    results : dict
        The results.json content of the job (design or comparison); the
        report renders it alone, its curves from ``figure_series``.
    dpi : int
        Resolution of the PNG figures [dots per inch].
    wind_spectrum : (frequency_hz, psd_m2_s2_per_hz, label), optional
        Wind-speed PSD [(m/s)^2/Hz] the modal force came from, drawn in figure 1.
    on_step : callable(done, total, description)
        Progress callback (see :mod:`tmd.report.progress`); silent by default.

    Returns
    -------
    dict of str -> bytes
        ``report.html``, ``figures/<name>.png`` and ``tables/<name>.csv``.
    """
    report = _Report(results, dpi, wind_spectrum, on_step)
    return report.files()


class _Report:
    """Builds sections, figures and tables in document order."""

    def __init__(self, results, dpi, wind_spectrum, on_step):
        self.results, self.dpi = results, dpi
        self.wind_spectrum, self.on_step = wind_spectrum, on_step
        self.series = results["figure_series"]
        self.structure_frequency_hz = float(self.series["structure_frequency_hz"])
        self.design = results.get("design")
        self.target = float(results["target"]["peak_acceleration_m_s2"])
        self.tables: list[Table] = []
        self.figures: list[Figure] = []
        self._axes: list = []  # the figures' axes, in the order of self.figures
        self.plan = self._plan()

    # -- bookkeeping -------------------------------------------------------------------
    def _plan(self) -> list[str]:
        steps = ["force_spectrum", "frequency_response", "acceleration_psd", "mass_ratio",
                 "comfort"]
        if self.results.get("sweep") and self.results.get("sweep_bare"):
            steps.append("detuning_sweep")
        if self.results.get("options"):
            steps.append("options")
        return steps + ["html"]

    def _step(self, name: str) -> None:
        self.on_step(self.plan.index(name), len(self.plan), name.replace("_", " "))

    def _table(self, table: Table) -> Table:
        self.tables.append(table)
        return table

    def _figure(self, name: str, ax, caption: str) -> Figure:
        # Drawn now, rendered to PNG later with the others, on two cores where there
        # are (savefig is most of a report's time): _render_figures replaces this
        # placeholder in its section.
        figure = Figure(name, b"", caption)
        self.figures.append(figure)
        self._axes.append(ax)
        return figure

    def _render_figures(self, sections: list[Section]) -> None:
        """Render every figure to PNG, alternate ones in a second process (side_by_side)."""
        axes = self._axes

        def render(part):
            return lambda: [plots.png_bytes(ax, self.dpi) for ax in part]

        here, there = side_by_side(render(axes[0::2]), render(axes[1::2]))
        pngs = [None] * len(axes)
        pngs[0::2], pngs[1::2] = here, there
        done = {id(old): Figure(old.name, png, old.caption)
                for old, png in zip(self.figures, pngs, strict=True)}
        for section in sections:
            section.blocks[:] = [done.get(id(block), block) for block in section.blocks]
        placeholders = {id(f) for f in self.figures}
        if any(id(block) in placeholders for section in sections for block in section.blocks):
            raise RuntimeError("a report figure is not a block of its section")
        self.figures = [done[id(f)] for f in self.figures]

    def files(self) -> dict[str, bytes]:
        sections = [self.job_section(), self.inputs_section(), self.bare_section(),
                    self.damper_section(), self.comfort_section()]
        across = across_wind_section(self.results, self._figure, self._table)
        if across is not None:
            sections.append(across)
        if self.results.get("sweep") or self.results.get("band_design"):
            sections.append(self.robustness_section())
        if self.results.get("options"):
            sections.append(self.options_section())
        sections.append(self.cautions_section())
        self._step("html")
        self._render_figures(sections)
        name = self.results["case"]["name"]
        lead = (f"Prepared with tmd {self.results.get('tool_version', '')} "
                f"(results schema {self.results.get('schema_version', '')}). "
                "Preliminary sizing: read the cautions in the last section.")
        html = document(f"Damper sizing report: {name}", lead, sections)
        out = {"report.html": html.encode("utf-8")}
        out |= {f"figures/{f.name}.png": f.png for f in self.figures}
        out |= {f"tables/{t.name}.csv": csv_bytes(t) for t in self.tables}
        self.on_step(len(self.plan), len(self.plan), "done")
        return out

    # -- sections ----------------------------------------------------------------------
    def job_section(self) -> Section:
        r = self.results
        kind = ("comparison of damper options" if r.get("options") else
                "TMD design" if "sizing" in r else "evaluation of a given damper")
        case_block = {"name": r["case"]["name"], "path": r["case"]["path"]}
        rows = [[Cell("job"), Cell(kind), Cell("")]]
        table = key_value_table("case", "The case", case_block, "case", keys=("name", "path"))
        table.rows[:0] = rows
        if "description" in r["case"].get("inputs", {}):
            table.rows.append([Cell("description"),
                               Cell(r["case"]["inputs"]["description"], "case.inputs.description"),
                               Cell("")])
        blocks = [
            "This report states the inputs, the models and the resulting damper specification "
            "for one building mode, so that another engineer can check them.",
            self._table(table),
            self._table(key_value_table("target", "Target", r["target"], "target")),
        ]
        if r.get("recommended"):
            blocks += recommendation_blocks(r["recommended"], self._table)
        return Section("The job and the case", blocks)

    def inputs_section(self) -> Section:
        inputs = self.results["case"].get("inputs", {})
        blocks = [
            self._table(key_value_table("inputs", "Inputs as given in the case file", inputs,
                                        "case.inputs", milli_g=False)),
            "Models used, with their references:", list(self._models(inputs)),
            "Conventions of the numbers:", list(CONVENTIONS),
        ]
        return Section("Inputs and assumptions", blocks)

    def _models(self, inputs: dict):
        if "wind" in inputs:
            spectrum = inputs["wind"].get("spectrum", "eurocode")
            yield ("Modal force from the wind: EN 1991-1-4:2005 mean wind and turbulence over "
                   f"height (terrain category, probability factor for the return period), the "
                   f"'{spectrum}' along-wind turbulence spectrum, quasi-steady strip loading with "
                   "Davenport's exponential root-coherence (Davenport 1962) and the mode shape "
                   "(z/h)^exponent normalised to 1 at the damper.")
        else:
            yield ("Modal force: the one-sided modal force PSD of the case's table, interpolated "
                   "linearly in log-log and zero outside its frequency range.")
        yield ("Response: linear random vibration of the mode with its absorbers, the variance "
               "and spectral moments integrated exactly over frequency (clustered Gauss-Legendre "
               "nodes at each closed-loop pole).")
        yield ("Peak values: Davenport's (1964) peak factor g = sqrt(2 ln(nu T)) + "
               "0.5772 / sqrt(2 ln(nu T)), with nu the up-crossing rate from the second and "
               "zeroth spectral moments and T the stated duration.")
        yield ("TMD tuning: frequency and damping ratio optimised (SLSQP) for the actual load "
               "from Warburton's (1982) white-noise optimum; least mass by Brent's method; the "
               "peak stroke limit is a constraint of every tuning.")
        yield ("Effective damping: the damping ratio the bare building would need for the same "
               "rms acceleration under the same load.")
        if self.results.get("sweep"):
            yield ("Detuning: the structure's frequency scaled by s with its modal mass held "
                   "(stiffness by s²); the damper keeps its mass, spring and dashpot.")
        yield ("Comfort limits: Melbourne & Palmer (1992) and the NBCC structural commentary, "
               "values from memory (see the comfort chart's note).")

    def bare_section(self) -> Section:
        r = self.results
        spectrum = self.series["force_spectrum"]
        f = np.asarray(spectrum["frequency_hz"], dtype=float)
        s_f = np.asarray(spectrum["force_psd_n2_per_hz"], dtype=float)
        wind = {}
        if self.wind_spectrum is not None:
            wind = dict(zip(("wind_frequency_hz", "wind_psd_m2_s2_per_hz", "wind_label"),
                            self.wind_spectrum, strict=True))
        self._step("force_spectrum")
        ax = plots.plot_force_spectrum(f, s_f, structure_frequency_hz=self.structure_frequency_hz,
                                       **wind)
        blocks = [self._figure("force_spectrum", ax, "Modal force spectrum of the design load "
                               "(one-sided, N²/Hz); the dotted line marks the structure "
                               "frequency."),
                  self._table(key_value_table("bare", "Bare building under the design load",
                                              r["bare"], "bare"))]
        entries = r.get("by_return_period") or []
        if entries:
            bare_parts = [{k: v for k, v in e.items() if k == "return_period_years" or
                           k == "bare" or k.startswith("bare_")} for e in entries]
            blocks.append(self._table(by_period_table(
                "by_return_period_bare", "Bare building per return period", bare_parts,
                "by_return_period")))
        return Section("Load and bare-building response", blocks)

    def damper_section(self) -> Section:
        r, design = self.results, self.design
        blocks = []
        if "sizing" in r:
            blocks.append(self._table(key_value_table(
                "sizing", "Sizing outcome", r["sizing"], "sizing",
                keys=("meets_target", "governed_by", "message"))))
        if design is None:
            blocks.append(Callout(self._no_design_statement()))
        else:
            blocks.append(self._table(key_value_table(
                "design", "Damper specification (translational TMD)", design, "design",
                keys=DESIGN_REPORT_ORDER, labels=DAMPER_LABELS)))
            if "peak_estimates" in r:
                method = r.get("target", {}).get("peak_method", "davenport")
                blocks.append(self._table(key_value_table(
                    "peak_estimates", f"Peak acceleration of this design by each estimate "
                    f"(the verdict uses {method})", r["peak_estimates"], "peak_estimates")))
            chosen = r.get("recommended", {})
            if "peak_estimates" in chosen:
                blocks.append(self._table(key_value_table(
                    "recommended_peak_estimates", "Peak acceleration of the recommended "
                    f"design ({chosen.get('design_key')}) by each estimate",
                    chosen["peak_estimates"], "recommended.peak_estimates")))
            band, source = self._band()
            blocks.append(self._table(retuning_table(design, band, source)))
            entries = r.get("by_return_period") or []
            damped = [{k: v for k, v in e.items() if k != "bare" and not k.startswith("bare_")}
                      for e in entries]
            if any(len(d) > 1 for d in damped):
                blocks.append(self._table(by_period_table(
                    "by_return_period_damper", "With the damper per return period: comfort "
                    "at short return periods, stroke and force for end-stops and the "
                    "supporting slab at long ones", damped, "by_return_period")))
            if r.get("end_stops"):
                blocks += [self._table(t) for t in end_stop_tables(r["end_stops"])]
        blocks += self._response_figures()
        title = ("Damper specification" if design is not None or "sizing" in r
                 else "Response without a specified damper")
        return Section(title, blocks)

    def _no_design_statement(self) -> str:
        """Why the results hold no design block, in the results' own words.

        The report states no verdict of its own: a design job's ``sizing``
        message says whether the bare building meets the target; a comparison
        sizes each option in its own section.
        """
        sizing = self.results.get("sizing")
        if sizing and sizing.get("message"):
            return f"No damper is specified: {sizing['message']}."
        if self.results.get("options"):
            return ("This comparison specifies no single damper: each option is sized in the "
                    "section 'Options', with its own verdict against the target. The figures "
                    "below show the bare building and best-tuned TMDs over a range of mass "
                    "ratios.")
        return "These results hold no damper design."

    def _band(self) -> tuple[float, str]:
        robust = self.results.get("band_design") or {}
        if robust.get("frequency_band") is not None:
            return float(robust["frequency_band"]), "the robust design's frequency band"
        stated = self.results.get("frequency_band", self.results.get("options_frequency_band"))
        if stated is not None:
            return float(stated), "the case's frequency band"
        return FREQUENCY_BAND, "default band; state [robustness] frequency_band"

    def _response_figures(self) -> list:
        r, design = self.results, self.design
        self._step("frequency_response")
        h = series.response_curves(self.series["response"])
        out = [self._figure("frequency_response", plots.plot_frequency_response(
            h.frequency_hz, h.bare, h.damped),
            "Acceleration at the evaluation height per unit modal force, "
            + ("bare and with the damper." if design else "bare building (no damper specified)."))]
        self._step("acceleration_psd")
        p = series.acceleration_psd(h)
        bare = r["bare"]
        ax = plots.plot_acceleration_psd(
            p.frequency_hz, p.bare, p.damped, bare_sigma_m_s2=bare["sigma_acceleration_m_s2"],
            bare_peak_m_s2=bare["peak_acceleration_m_s2"],
            damped_sigma_m_s2=design and design["sigma_acceleration_m_s2"],
            damped_peak_m_s2=design and design["peak_acceleration_m_s2"])
        out.append(self._figure("acceleration_psd", ax, "One-sided acceleration PSD "
                                "|H_a|² S_F under the design load; rms and peak from the "
                                "results."))
        self._step("mass_ratio")
        study = self.series["mass_ratio_study"]
        ax = plots.plot_mass_ratio_study(
            *(np.asarray(study[key], dtype=float)
              for key in ("mass_ratio", "peak_acceleration_m_s2", "peak_stroke_m")),
            target_peak_m_s2=self.target, chosen_mass_ratio=design and design["mass_ratio"],
            chosen_peak_m_s2=design and design["peak_acceleration_m_s2"],
            chosen_stroke_m=design and design["peak_stroke_m"],
            max_stroke_m=study.get("max_stroke_m"))
        out.append(self._figure("mass_ratio", ax, "Peak acceleration and peak stroke of the "
                                "best-tuned TMD at each mass ratio (same objective and stroke "
                                "limit as the case's design)"
                                + ("; the star marks the chosen design." if design else ".")))
        return out

    def comfort_section(self) -> Section:
        self._step("comfort")
        responses = series.comfort_responses(self.results, self.structure_frequency_hz)
        shown, hidden = series.matching_limits(comfort_limits(), responses)
        ax = plots.plot_comfort_chart(
            shown, responses, target_peak_m_s2=self.target,
            target_return_period_years=series.design_return_period(self.results))
        caption = comfort_caption(shown, hidden, responses)
        blocks = [self._figure("comfort", ax, caption),
                  "Comfort limits shipped with the tool: "
                  + "; ".join(f"{c.label} ({c.provenance})" for c in comfort_limits())
                  + ". Check them against the documents before relying on them; the project's "
                  "own criteria and local codes take precedence."]
        return Section("Occupant comfort", blocks)

    def robustness_section(self) -> Section:
        r, design = self.results, self.design
        blocks = []
        if r.get("peak_acceleration_band_max_m_s2") is not None and design is not None:
            rows = [[Cell("target"), Cell(r["target"]["peak_acceleration_m_s2"],
                                          "target.peak_acceleration_m_s2"), Cell("m/s²")],
                    [Cell("design, nominal frequency"),
                     Cell(design["peak_acceleration_m_s2"], "design.peak_acceleration_m_s2"),
                     Cell("m/s²")],
                    [Cell("design, worst across the band"),
                     Cell(r["peak_acceleration_band_max_m_s2"],
                          "peak_acceleration_band_max_m_s2"), Cell("m/s²")],
                    [Cell("design, worst across the band (milli-g)"),
                     Cell(r["peak_acceleration_band_max_m_s2"],
                          "peak_acceleration_band_max_m_s2", MILLI_G), Cell("milli-g")]]
            blocks.append(self._table(Table("band", "What the nominal design keeps across the "
                                            "frequency band", [Cell("quantity"), Cell("value"),
                                                               Cell("unit")], rows)))
        robust = r.get("band_design")
        if robust and design:
            blocks.append(self._table(self._robust_table(design, robust)))
            extra = robust["mass_kg"] / design["mass_kg"] - 1.0
            blocks.append(f"Holding the target across the band costs {100 * extra:.1f} % more "
                          "damper mass than the nominal optimum.")
        if r.get("sweep") and r.get("sweep_bare"):
            blocks.append(self._sweep_figure())
        for key, title in SWEEP_TITLES:
            if r.get(key):
                blocks.append(self._table(record_table(key, title, r[key], key)))
        if r.get("probabilistic"):
            blocks.append(self._table(key_value_table(
                "probabilistic", "Probabilistic check (random structure frequency and damping)",
                r["probabilistic"], "probabilistic")))
        return Section("Robustness to the building's real frequency", blocks)

    def _robust_table(self, design: dict, robust: dict) -> Table:
        keys = [k for k in DESIGN_REPORT_ORDER if k in robust] + [
            k for k in ("frequency_band", "peak_acceleration_band_max_m_s2") if k in robust]
        rows = []
        for key in keys:
            label, unit = label_and_unit(key, labels=DAMPER_LABELS)
            nominal = Cell(design[key], f"design.{key}") if key in design else Cell("")
            rows.append([Cell(label), nominal, Cell(robust[key], f"band_design.{key}"),
                         Cell(unit)])
        header = [Cell("quantity"), Cell("nominal design"), Cell("robust design"), Cell("unit")]
        return Table("robust_design", "Robust design beside the nominal one", header, rows)

    def _sweep_figure(self) -> Figure:
        r = self.results
        self._step("detuning_sweep")
        nominal = series.sweep_from_results(r["sweep"])
        bare = series.sweep_from_results(r["sweep_bare"])
        band = self._band()[0]
        robust = self.series.get("band_design_sweep")
        robust_curve = series.Sweep(
            np.asarray(robust["structure_frequency_factor"], dtype=float),
            np.asarray(robust["peak_acceleration_m_s2"], dtype=float)) if robust else None
        bare_on_grid = np.interp(nominal.structure_frequency_factor,
                                 bare.structure_frequency_factor, bare.peak_acceleration_m_s2)
        ax = plots.plot_detuning_sweep(
            nominal.structure_frequency_factor, bare_on_grid, nominal.peak_acceleration_m_s2,
            target_peak_m_s2=self.target, frequency_band=band,
            robust_factor=None if robust_curve is None else robust_curve.structure_frequency_factor,
            robust_m_s2=None if robust_curve is None else robust_curve.peak_acceleration_m_s2)
        return self._figure("detuning_sweep", ax, "Peak acceleration as the building's frequency "
                            "departs from nominal (modal mass held, damper unchanged); the shaded "
                            "band is the stated frequency uncertainty.")

    def options_section(self) -> Section:
        options = self.results["options"]
        blocks = [self._table(across_table(
            "options", "Damper options compared (one column per option)", options, "options",
            column_key="option",
            skip=("dampers", "message", "by_return_period", "freeboard_note", "freeboard_basis"))),
            self._table(record_table("options_outcome", "What each option's sizing found",
                                     options, "options", columns=("option", "message")))]
        for i, option in enumerate(options):
            if option.get("dampers"):
                blocks.append(self._table(record_table(
                    f"options_{i}_dampers", f"Dampers of the option '{option['option']}'",
                    option["dampers"], f"options.{i}.dampers")))
            if option.get("by_return_period"):
                blocks.append(self._table(by_period_table(
                    f"options_{i}_by_return_period",
                    f"Option '{option['option']}' at every return period"
                    + (f", against its freeboard {option['dimensions']['freeboard_m']:.3f} m"
                       if "freeboard_m" in option["dimensions"] else ""),
                    option["by_return_period"], f"options.{i}.by_return_period",
                    note=" ".join(filter(None, (option.get("freeboard_note"),
                                                "Freeboard: " + option["freeboard_basis"] + "."
                                                if option.get("freeboard_basis") else ""))))))
        self._step("options")
        band = [o.get("peak_acceleration_band_max_m_s2") for o in options]
        ax = plots.plot_option_comparison(
            [o["option"] for o in options], [o["mass_ratio"] for o in options],
            [o["peak_acceleration_m_s2"] for o in options],
            None if any(b is None for b in band) else band, target_peak_m_s2=self.target)
        caption = ("Peak acceleration of each option (filled circles), one row per option, "
                   "labelled with its added mass as a share of the modal mass M*")
        if ax.get_legend() is not None and len(ax.lines) > 1:
            caption += "; open triangles: the worst peak across the frequency band"
        blocks.append(self._figure("options", ax, caption + "."))
        return Section("Options", blocks)

    def cautions_section(self) -> Section:
        blocks = []
        if self.results.get("warnings"):
            blocks += ["Warnings raised while computing:", list(self.results["warnings"])]
        # the cautions exactly as results.json states them (one source: the job)
        blocks += ["Cautions:", list(self.results["cautions"])]
        return Section("Warnings and cautions", blocks)
