//! SVG plot of a curve: species fractions on top, net charge below, legend at the right.
//!
//! Written by string building so the crate needs no drawing library.

use std::fmt::Write;

use crate::Curve;

/// What to draw besides the curve itself.
#[derive(Clone, Debug, PartialEq)]
pub struct PlotOptions {
    /// Title above the plot (e.g. the compound's name or SMILES).
    pub title: Option<String>,
    /// pH of interest, marked by a vertical dashed line with its value.
    pub ph: Option<f64>,
    /// Isoelectric point, marked on the charge panel.
    pub isoelectric_point: Option<f64>,
    /// Width of the picture in pixels.
    pub width: f64,
    /// Height of the picture in pixels.
    pub height: f64,
}

impl Default for PlotOptions {
    fn default() -> Self {
        Self {
            title: None,
            ph: None,
            isoelectric_point: None,
            width: 920.0,
            height: 600.0,
        }
    }
}

// A qualitative palette distinguishable in print and for the common colour-vision
// deficiencies (the Tableau 10 set; common practice). Past ten species lines turn dashed.
const PALETTE: [&str; 10] = [
    "#4e79a7", "#f28e2b", "#e15759", "#59a14f", "#b07aa1", "#76b7b2", "#edc948", "#9c755f",
    "#ff9da7", "#5f6b6d",
];
const FONT: &str = "font-family=\"Helvetica, Arial, sans-serif\"";
// A white outline under labels that sit on the lines, so they stay legible.
const HALO: &str =
    "paint-order=\"stroke\" stroke=\"#ffffff\" stroke-width=\"3\" stroke-linejoin=\"round\"";
const LEGEND_WIDTH: f64 = 300.0;
const LABEL_CHARS: usize = 34;

/// Renders `curve` as SVG: one coloured line per species (legend: charge and `labels[i]`,
/// e.g. its SMILES, plus its fraction at the marked pH), the fraction not covered by the
/// listed species as a grey dotted line when it is visible, the pH of interest as a dashed
/// vertical line, and the mean net charge in a panel below.
pub fn svg_plot(curve: &Curve, labels: &[String], options: &PlotOptions) -> String {
    let w = options.width.max(480.0);
    let h = options.height.max(360.0);
    let mut s = String::new();
    let _ = write!(
        s,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w:.0}\" height=\"{h:.0}\" viewBox=\"0 0 {w:.0} {h:.0}\">\n\
         <rect width=\"100%\" height=\"100%\" fill=\"#ffffff\"/>\n"
    );
    let top = if options.title.is_some() { 56.0 } else { 28.0 };
    if let Some(t) = &options.title {
        let _ = writeln!(
            s,
            "<text x=\"{:.1}\" y=\"30\" {FONT} font-size=\"17\" font-weight=\"bold\" fill=\"#222\">{}</text>",
            64.0,
            escape(&truncate(t, 90))
        );
    }
    let (Some(first), Some(last)) = (curve.points.first(), curve.points.last()) else {
        let _ = writeln!(s, "<text x=\"{:.1}\" y=\"{:.1}\" {FONT} font-size=\"14\" fill=\"#555\">no points to plot</text>", w / 2.0 - 60.0, h / 2.0);
        s.push_str("</svg>\n");
        return s;
    };
    let (x0, mut x1) = (first.ph, last.ph);
    if x1 <= x0 {
        x1 = x0 + 1.0;
    }
    let left = 70.0;
    let right = w - LEGEND_WIDTH - 24.0;
    let bottom_all = h - 52.0;
    let gap = 34.0;
    let charge_h = ((bottom_all - top) * 0.28).max(80.0);
    let frac_top = top;
    let frac_bottom = bottom_all - charge_h - gap;
    let charge_top = frac_bottom + gap;
    let charge_bottom = bottom_all;
    let px = |ph: f64| left + (ph - x0) / (x1 - x0) * (right - left);
    let fy = |f: f64| frac_bottom - f.clamp(0.0, 1.0) * (frac_bottom - frac_top);

    // Charge axis: integer bounds around the curve, always including zero.
    let (mut cmin, mut cmax) = (0.0f64, 0.0f64);
    for p in &curve.points {
        if p.charge.is_finite() {
            cmin = cmin.min(p.charge);
            cmax = cmax.max(p.charge);
        }
    }
    let (cmin, mut cmax) = (cmin.floor(), cmax.ceil());
    if cmax - cmin < 1.0 {
        cmax = cmin + 1.0;
    }
    let cy = |c: f64| charge_bottom - (c - cmin) / (cmax - cmin) * (charge_bottom - charge_top);

    // Grid and ticks.
    let xstep = nice_step(x1 - x0, 10.0);
    let mut xt = (x0 / xstep).ceil() * xstep;
    s.push_str("<g stroke=\"#e6e6e6\" stroke-width=\"1\">\n");
    let mut xticks = Vec::new();
    while xt <= x1 + 1e-9 * xstep {
        xticks.push(xt);
        let x = px(xt);
        let _ = writeln!(
            s,
            "<line x1=\"{x:.1}\" y1=\"{frac_top:.1}\" x2=\"{x:.1}\" y2=\"{frac_bottom:.1}\"/>"
        );
        let _ = writeln!(
            s,
            "<line x1=\"{x:.1}\" y1=\"{charge_top:.1}\" x2=\"{x:.1}\" y2=\"{charge_bottom:.1}\"/>"
        );
        xt += xstep;
    }
    for i in 0..=5 {
        let y = fy(i as f64 * 0.2);
        let _ = writeln!(
            s,
            "<line x1=\"{left:.1}\" y1=\"{y:.1}\" x2=\"{right:.1}\" y2=\"{y:.1}\"/>"
        );
    }
    let cstep = nice_step(cmax - cmin, 4.0).max(1.0);
    let mut cticks = Vec::new();
    let mut ct = (cmin / cstep).ceil() * cstep;
    while ct <= cmax + 1e-9 {
        cticks.push(ct);
        let y = cy(ct);
        let _ = writeln!(
            s,
            "<line x1=\"{left:.1}\" y1=\"{y:.1}\" x2=\"{right:.1}\" y2=\"{y:.1}\"/>"
        );
        ct += cstep;
    }
    s.push_str("</g>\n");

    // Axes frames.
    let _ = writeln!(
        s,
        "<g fill=\"none\" stroke=\"#444\" stroke-width=\"1.2\">\n\
         <rect x=\"{left:.1}\" y=\"{frac_top:.1}\" width=\"{:.1}\" height=\"{:.1}\"/>\n\
         <rect x=\"{left:.1}\" y=\"{charge_top:.1}\" width=\"{:.1}\" height=\"{:.1}\"/>\n</g>",
        right - left,
        frac_bottom - frac_top,
        right - left,
        charge_bottom - charge_top
    );
    let zero = cy(0.0);
    let _ = writeln!(
        s,
        "<line x1=\"{left:.1}\" y1=\"{zero:.1}\" x2=\"{right:.1}\" y2=\"{zero:.1}\" stroke=\"#999\" stroke-width=\"1\"/>"
    );

    // Tick labels.
    let _ = writeln!(s, "<g {FONT} font-size=\"12\" fill=\"#333\">");
    for &t in &xticks {
        let x = px(t);
        let _ = writeln!(
            s,
            "<line x1=\"{x:.1}\" y1=\"{charge_bottom:.1}\" x2=\"{x:.1}\" y2=\"{:.1}\" stroke=\"#444\"/>\
             <text x=\"{x:.1}\" y=\"{:.1}\" text-anchor=\"middle\">{}</text>",
            charge_bottom + 5.0,
            charge_bottom + 19.0,
            fmt_tick(t, xstep)
        );
        let _ = writeln!(s, "<line x1=\"{x:.1}\" y1=\"{frac_bottom:.1}\" x2=\"{x:.1}\" y2=\"{:.1}\" stroke=\"#444\"/>", frac_bottom + 4.0);
    }
    for i in 0..=5 {
        let f = i as f64 * 0.2;
        let y = fy(f);
        let _ = writeln!(
            s,
            "<line x1=\"{:.1}\" y1=\"{y:.1}\" x2=\"{left:.1}\" y2=\"{y:.1}\" stroke=\"#444\"/>\
             <text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\">{f:.1}</text>",
            left - 5.0,
            left - 8.0,
            y + 4.0
        );
    }
    for &t in &cticks {
        let y = cy(t);
        let _ = writeln!(
            s,
            "<line x1=\"{:.1}\" y1=\"{y:.1}\" x2=\"{left:.1}\" y2=\"{y:.1}\" stroke=\"#444\"/>\
             <text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\">{}</text>",
            left - 5.0,
            left - 8.0,
            y + 4.0,
            signed(t)
        );
    }
    s.push_str("</g>\n");
    // Axis labels.
    let _ = writeln!(
        s,
        "<g {FONT} font-size=\"14\" fill=\"#222\">\n\
         <text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"middle\">pH</text>\n\
         <text transform=\"translate({:.1} {:.1}) rotate(-90)\" text-anchor=\"middle\">fraction</text>\n\
         <text transform=\"translate({:.1} {:.1}) rotate(-90)\" text-anchor=\"middle\">net charge</text>\n</g>",
        (left + right) / 2.0,
        charge_bottom + 40.0,
        left - 46.0,
        (frac_top + frac_bottom) / 2.0,
        left - 46.0,
        (charge_top + charge_bottom) / 2.0
    );

    // Clip the lines to the panels so a charge beyond the rounded bounds cannot spill.
    let _ = writeln!(
        s,
        "<defs><clipPath id=\"frac\"><rect x=\"{left:.1}\" y=\"{:.1}\" width=\"{:.1}\" height=\"{:.1}\"/></clipPath>\
         <clipPath id=\"chg\"><rect x=\"{left:.1}\" y=\"{charge_top:.1}\" width=\"{:.1}\" height=\"{:.1}\"/></clipPath></defs>",
        frac_top - 2.0,
        right - left,
        frac_bottom - frac_top + 4.0,
        right - left,
        charge_bottom - charge_top
    );

    // Species lines.
    let mut legend: Vec<(String, String, &str, String, String)> = Vec::new();
    let mark_index = options.ph.and_then(|ph| nearest(curve, ph));
    s.push_str("<g clip-path=\"url(#frac)\" fill=\"none\" stroke-width=\"2.2\" stroke-linejoin=\"round\">\n");
    for (k, sp) in curve.species.iter().enumerate() {
        let color = PALETTE[k % PALETTE.len()];
        let dash = if k >= PALETTE.len() { "6 3" } else { "" };
        let pts: Vec<String> = curve
            .points
            .iter()
            .map(|p| {
                format!(
                    "{:.1},{:.1}",
                    px(p.ph),
                    fy(p.fractions.get(k).copied().unwrap_or(0.0))
                )
            })
            .collect();
        let _ = writeln!(
            s,
            "<polyline stroke=\"{color}\"{} points=\"{}\"/>",
            if dash.is_empty() {
                String::new()
            } else {
                format!(" stroke-dasharray=\"{dash}\"")
            },
            pts.join(" ")
        );
        let label = labels
            .get(k)
            .cloned()
            .unwrap_or_else(|| format!("species {}", k + 1));
        let at = mark_index
            .and_then(|i| curve.points[i].fractions.get(k).copied())
            .map(percent)
            .unwrap_or_default();
        legend.push((
            signed(f64::from(sp.charge)),
            label,
            color,
            dash.to_string(),
            at,
        ));
    }
    let max_other = curve.points.iter().map(|p| p.other).fold(0.0, f64::max);
    if max_other > 0.005 {
        let pts: Vec<String> = curve
            .points
            .iter()
            .map(|p| format!("{:.1},{:.1}", px(p.ph), fy(p.other)))
            .collect();
        let _ = writeln!(
            s,
            "<polyline stroke=\"#8c8c8c\" stroke-dasharray=\"2 3\" points=\"{}\"/>",
            pts.join(" ")
        );
        let at = mark_index
            .map(|i| percent(curve.points[i].other))
            .unwrap_or_default();
        legend.push((
            String::new(),
            "all other microspecies".to_string(),
            "#8c8c8c",
            "2 3".to_string(),
            at,
        ));
    }
    s.push_str("</g>\n");

    // Charge curve.
    let pts: Vec<String> = curve
        .points
        .iter()
        .filter(|p| p.charge.is_finite())
        .map(|p| format!("{:.1},{:.1}", px(p.ph), cy(p.charge)))
        .collect();
    let _ = writeln!(
        s,
        "<polyline clip-path=\"url(#chg)\" fill=\"none\" stroke=\"#222\" stroke-width=\"2\" points=\"{}\"/>",
        pts.join(" ")
    );
    if let Some(pi) = options.isoelectric_point.filter(|p| *p >= x0 && *p <= x1) {
        let x = px(pi);
        let _ = writeln!(
            s,
            "<circle cx=\"{x:.1}\" cy=\"{zero:.1}\" r=\"4\" fill=\"#ffffff\" stroke=\"#222\" stroke-width=\"1.5\"/>\
             <text x=\"{:.1}\" y=\"{:.1}\" {FONT} font-size=\"12\" fill=\"#222\" {HALO}>pI {pi:.2}</text>",
            x + 7.0,
            zero - 7.0
        );
    }

    // pH of interest.
    if let Some(ph) = options.ph.filter(|p| *p >= x0 && *p <= x1) {
        let x = px(ph);
        let _ = writeln!(
            s,
            "<g stroke=\"#c0392b\" stroke-width=\"1.4\" stroke-dasharray=\"6 4\">\
             <line x1=\"{x:.1}\" y1=\"{frac_top:.1}\" x2=\"{x:.1}\" y2=\"{frac_bottom:.1}\"/>\
             <line x1=\"{x:.1}\" y1=\"{charge_top:.1}\" x2=\"{x:.1}\" y2=\"{charge_bottom:.1}\"/></g>"
        );
        let anchor = if x > right - 70.0 { "end" } else { "start" };
        let dx = if anchor == "end" { -5.0 } else { 5.0 };
        let _ = writeln!(
            s,
            "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"{anchor}\" {FONT} font-size=\"12\" font-weight=\"bold\" fill=\"#c0392b\" {HALO}>pH {ph:.2}</text>",
            x + dx,
            frac_top + 15.0
        );
        if let Some(i) = mark_index {
            let c = curve.points[i].charge;
            let _ = writeln!(
                s,
                "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"{anchor}\" {FONT} font-size=\"12\" fill=\"#c0392b\" {HALO}>charge {}</text>",
                x + dx,
                charge_top + 15.0,
                signed_frac(c)
            );
        }
    }

    // Legend.
    let lx = right + 24.0;
    let _ = writeln!(
        s,
        "<text x=\"{lx:.1}\" y=\"{:.1}\" {FONT} font-size=\"13\" font-weight=\"bold\" fill=\"#222\">microspecies{}</text>",
        frac_top + 12.0,
        match mark_index {
            Some(i) => format!(" (share at pH {:.2})", curve.points[i].ph),
            None => String::new(),
        }
    );
    let row = 21.0;
    for (k, (charge, label, color, dash, at)) in legend.iter().enumerate() {
        let y = frac_top + 34.0 + k as f64 * row;
        if y > h - 10.0 {
            break;
        }
        let dash_attr = if dash.is_empty() {
            String::new()
        } else {
            format!(" stroke-dasharray=\"{dash}\"")
        };
        let _ = writeln!(
            s,
            "<g><title>{}</title><line x1=\"{lx:.1}\" y1=\"{:.1}\" x2=\"{:.1}\" y2=\"{:.1}\" stroke=\"{color}\" stroke-width=\"3\"{dash_attr}/>\
             <text x=\"{:.1}\" y=\"{:.1}\" {FONT} font-size=\"12\" font-weight=\"bold\" fill=\"#222\" text-anchor=\"end\">{}</text>\
             <text x=\"{:.1}\" y=\"{:.1}\" font-family=\"DejaVu Sans Mono, Menlo, monospace\" font-size=\"11.5\" fill=\"#222\">{}</text>\
             <text x=\"{:.1}\" y=\"{:.1}\" {FONT} font-size=\"12\" fill=\"#555\" text-anchor=\"end\">{}</text></g>",
            escape(label),
            y - 4.0,
            lx + 22.0,
            y - 4.0,
            lx + 52.0,
            y,
            escape(charge),
            lx + 58.0,
            y,
            escape(&truncate(label, LABEL_CHARS - 9)),
            w - 8.0,
            y,
            escape(at)
        );
    }
    s.push_str("</svg>\n");
    s
}

fn nearest(curve: &Curve, ph: f64) -> Option<usize> {
    let (first, last) = (curve.points.first()?.ph, curve.points.last()?.ph);
    if ph < first || ph > last {
        return None;
    }
    curve
        .points
        .iter()
        .enumerate()
        .min_by(|a, b| (a.1.ph - ph).abs().total_cmp(&(b.1.ph - ph).abs()))
        .map(|(i, _)| i)
}

/// A step of 1, 2 or 5 times a power of ten giving about `target` intervals.
fn nice_step(span: f64, target: f64) -> f64 {
    if !(span.is_finite() && span > 0.0) {
        return 1.0;
    }
    let raw = span / target;
    let mag = 10f64.powf(raw.log10().floor());
    for m in [1.0, 2.0, 5.0, 10.0] {
        if m * mag >= raw {
            return m * mag;
        }
    }
    10.0 * mag
}

fn fmt_tick(v: f64, step: f64) -> String {
    let decimals = if step >= 1.0 {
        0
    } else {
        (-step.log10().floor()) as usize
    };
    let v = if v.abs() < 1e-9 * step { 0.0 } else { v };
    format!("{v:.decimals$}").replace('-', "\u{2212}")
}

fn signed(v: f64) -> String {
    if v > 0.0 {
        format!("+{v:.0}")
    } else if v < 0.0 {
        format!("\u{2212}{:.0}", -v)
    } else {
        "0".to_string()
    }
}

fn signed_frac(v: f64) -> String {
    if v.abs() < 0.005 {
        "0.00".to_string()
    } else if v > 0.0 {
        format!("+{v:.2}")
    } else {
        format!("\u{2212}{:.2}", -v)
    }
}

fn percent(f: f64) -> String {
    let p = f * 100.0;
    if p >= 10.0 {
        format!("{p:.0} %")
    } else if p >= 0.1 {
        format!("{p:.1} %")
    } else {
        "<0.1 %".to_string()
    }
}

fn truncate(s: &str, max: usize) -> String {
    if s.chars().count() <= max {
        s.to_string()
    } else {
        let mut t: String = s.chars().take(max.saturating_sub(1)).collect();
        t.push('\u{2026}');
        t
    }
}

fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            // Control characters are not allowed in XML 1.0 text.
            c if (c as u32) < 0x20 && c != '\t' && c != '\n' => out.push('\u{fffd}'),
            c => out.push(c),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escapes_markup_in_labels() {
        assert_eq!(escape("a<b&\"c'>"), "a&lt;b&amp;&quot;c&apos;&gt;");
    }

    #[test]
    fn nice_steps() {
        assert_eq!(nice_step(14.0, 10.0), 2.0);
        assert_eq!(nice_step(4.0, 10.0), 0.5);
        assert_eq!(nice_step(3.0, 4.0), 1.0);
    }

    #[test]
    fn plot_has_axes_legend_and_marker() {
        use crate::{Kind, Microstates, SiteInput, System};
        let system = System {
            sites: vec![
                SiteInput {
                    kind: Kind::Acid,
                    pka: 2.3,
                },
                SiteInput {
                    kind: Kind::Base,
                    pka: 9.6,
                },
            ],
            interaction: vec![],
            base_charge: 0,
        };
        let m = Microstates::new(&system).unwrap();
        let curve = m.curve(0.0, 14.0, 0.1).unwrap();
        let labels: Vec<String> = (0..curve.species.len())
            .map(|i| format!("label<{i}>"))
            .collect();
        let options = PlotOptions {
            ph: Some(7.4),
            isoelectric_point: m.isoelectric_point(),
            ..PlotOptions::default()
        };
        let svg = svg_plot(&curve, &labels, &options);
        for needle in [
            ">pH</text>",
            ">fraction</text>",
            ">net charge</text>",
            ">pH 7.40</text>",
            "stroke-dasharray=\"6 4\"",
            "label&lt;0&gt;",
            ">pI 5.95</text>",
        ] {
            assert!(svg.contains(needle), "missing {needle}");
        }
        assert_eq!(svg.matches("<polyline").count(), curve.species.len() + 1);
        assert_eq!(svg.matches("<svg").count(), 1);
        assert!(svg.ends_with("</svg>\n"));
    }

    #[test]
    fn empty_curve_still_renders() {
        let c = Curve {
            species: vec![],
            points: vec![],
            method: "exact".into(),
        };
        let s = svg_plot(&c, &[], &PlotOptions::default());
        assert!(s.starts_with("<svg") && s.ends_with("</svg>\n"));
        assert!(s.contains("no points to plot"));
    }
}
