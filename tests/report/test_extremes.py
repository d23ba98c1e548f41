"""Extreme-wind checks on the Kestrel Point demo: the 50-year stroke exceedance is flagged
in results.json, the warnings and the report, and the end-stop numbers trace to results.json."""

import pytest

from tests.report.test_document import cells_of, lookup, printed_number


def _kestrel(case_report):
    case, results, files = case_report
    if case.path.stem != "kestrel_point":
        pytest.skip("the demo with a stroke limit and three return periods")
    return case, results, files


def test_fifty_year_stroke_exceedance_is_flagged(case_report):
    case, results, _ = _kestrel(case_report)
    rows = {r["return_period_years"]: r["design"] for r in results["by_return_period"]}
    limit = case.damper.max_stroke_m
    # The verdict is the one comparison peak <= limit, at every return period.
    for d in rows.values():
        assert d["stroke_within_limit"] == (d["peak_stroke_m"] <= limit)
    assert rows[1.0]["stroke_within_limit"] and not rows[50.0]["stroke_within_limit"]
    assert any("50-year" in w and "end-stops" in w for w in results["warnings"])


def test_end_stop_figures_trace_into_the_report(case_report):
    _, results, files = _kestrel(case_report)
    e = results["end_stops"]
    assert e["travel_m"] == 1.2 and e["extreme_return_period_years"] == 50.0
    html = files["report.html"].decode("utf-8")
    keyed = {c["attrs"].get("data-key"): c for c in cells_of(html) if c["attrs"].get("data-key")}
    shown = [k for k in keyed if k.startswith("end_stops.")]
    assert "end_stops.impact_velocity_mean_m_s" in shown
    path = "end_stops.by_return_period.2.contact_rate_per_side_hz"
    assert path in shown
    # Contacts per hour are the per-second rate times 3600 (display scale).
    assert printed_number(keyed[path]["text"]) == pytest.approx(
        3600 * lookup(results, path), rel=1e-3)
    assert "tables/end_stops_by_return_period.csv" in files


def test_recommendation_is_the_band_robust_design_and_leads_the_report(case_report):
    _, results, files = _kestrel(case_report)
    rec = results["recommended"]
    # Issue 11: nominal 49.8 t exceeds the target across the band; the band-robust design
    # meets it there, so the rule picks it; its verdict is its own.
    assert rec["design_key"] == "band_design"
    assert rec["mass_kg"] == results["band_design"]["mass_kg"]
    assert rec["meets_target_across_band"] == results["band_design"][
        "meets_target_across_band"] is True
    assert results["design"] is not None  # the nominal design stays under its own key
    html = files["report.html"].decode("utf-8")
    first = html.index("Recommended specification")
    assert first < html.index("Damper specification (translational TMD)")
    keyed = {c["attrs"].get("data-key") for c in cells_of(html)}
    assert {"recommended.mass_kg", "recommended.peak_acceleration_band_max_m_s2",
            "recommended.end_stops.by_return_period.2.contact_rate_per_side_hz"} <= keyed
    # The recommended design's own extreme-wind checks, one comparison each.
    limit = 1.2
    for row in rec["by_return_period"]:
        d = row["design"]
        assert d["stroke_within_limit"] == (d["peak_stroke_m"] <= limit)


def test_recommended_design_shows_its_peak_by_each_estimate(case_report):
    _, results, files = _kestrel(case_report)
    rec = results["recommended"]
    est = rec["peak_estimates"]
    # Davenport's estimate is the tool's default peak (peak_method "davenport"),
    # so it is the recommended design's own peak; Vanmarcke's (1975) two-sided
    # first-passage mean sits beside it (tmd.peak, tested against Rice's law).
    assert results["target"]["peak_method"] == "davenport"
    assert est["davenport_peak_acceleration_m_s2"] == pytest.approx(
        rec["peak_acceleration_m_s2"], rel=1e-9)
    assert est["vanmarcke_peak_acceleration_m_s2"] > 0
    # The third estimate: the mean largest |a| of 40 seeded records of 600 s
    # (tmd.simulation, checked against first-passage results there); within
    # 15% of Davenport for a damped, two-peaked response (the issue measured
    # 0.975 of Davenport on a damped demo; 40 records add ~1.5% scatter).
    assert est["simulated_records"] == 40
    assert est["simulated_peak_acceleration_m_s2"] == pytest.approx(
        est["davenport_peak_acceleration_m_s2"], rel=0.15)
    html = files["report.html"].decode("utf-8")
    keyed = {c["attrs"].get("data-key") for c in cells_of(html)}
    assert "recommended.peak_estimates.vanmarcke_peak_acceleration_m_s2" in keyed
    assert "recommended.peak_estimates.simulated_peak_acceleration_m_s2" in keyed


def test_terminal_shows_the_fifty_year_exceedance_and_the_recommendation(case_report,
                                                                         monkeypatch):
    # Issue 11: "Nothing in the terminal ... flags it" and "no line says which to specify".
    # The terminal's tables and lines are read from the same results.json.
    import io

    from rich.console import Console

    from tmd import terminal

    case, results, _ = _kestrel(case_report)
    buffer = io.StringIO()
    monkeypatch.setattr(terminal, "out_console", Console(file=buffer, width=120,
                                                         color_system=None))
    monkeypatch.setattr(terminal, "err_console", Console(file=buffer, width=120,
                                                         color_system=None))
    table = terminal.return_period_table(results)
    terminal.out_console.print(table)
    terminal.print_recommendation(results)
    terminal.print_notes(results)
    text = buffer.getvalue()
    rows = {r["return_period_years"]: r["design"]["stroke_within_limit"]
            for r in results["by_return_period"]}
    assert rows == {1.0: True, 10.0: True, 50.0: False}
    fifty = [line for line in text.splitlines() if line.strip().startswith("│") and "50 y" in line]
    assert fifty and "EXCEEDED" in fifty[0]
    assert "Recommended: the band-robust design" in text
    assert "at the 50-year wind the peak stroke" in text  # the warning
