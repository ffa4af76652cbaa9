package dev.watcher.report;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeSet;

/**
 * Turns a run's history and events into plot specifications for the page script: shared x values, one
 * array per line, and the overlays (levels, condition spans with their markers, settled bands, predicted
 * values). Data only; the page script draws.
 */
final class Charts {

    /** The residual levels drawn on every residual plot. */
    static final double[] LEVELS = {1e-3, 1e-5, 1e-6};
    /** At most this many condition spans per plot (the most severe first), so the page stays readable. */
    static final int MAX_SPANS = 120;

    static final ObjectMapper JSON = new ObjectMapper();

    /** One line of a legend: what it is and how it is drawn. */
    record Line(String label, String colour, int[] dash, double width) {
    }

    /** A plot: its element id, the spec for the script, its legend and caption text. */
    record Chart(String id, ObjectNode spec, List<Line> legend, String caption) {
    }

    private Charts() {
    }

    /** The residual plot: per equation the highest value of each bucket, on a log axis. */
    static Chart residuals(String id, History h, List<Event> events) {
        Map<String, History.Track> tracks = h.residuals();
        ObjectNode spec = base(id, "iteration", "residual", true);
        List<Line> legend = lines(spec, tracks);
        ArrayNode levels = spec.putArray("levels");
        for (double l : LEVELS) {
            levels.add(l);
        }
        spec.set("spans", spans(events, e -> e.monitor() == null && !isMonitorPattern(e.pattern())));
        spec.set("actions", actions(events));
        long width = tracks.values().stream().mapToLong(History.Track::width).max().orElse(1);
        long count = tracks.values().stream().mapToLong(History.Track::count).max().orElse(0);
        String caption = "Highest residual in each bucket of " + Numbers.count(width) + " iteration"
                + (width == 1 ? "" : "s") + " (" + Numbers.count(count) + " records), log axis; dashed grey lines"
                + " at 1e-3, 1e-5 and 1e-6. Bars at the top (and faint shading): a condition open, from the"
                + " marker where it opened (\u25bc critical, \u25c6 warning, \u25a0 info) to the ring where it"
                + " resolved; numbers are the event numbers of the table below."
                + " \u2715 at the top: a non-finite value in that bucket."
                + (spec.path("actions").isEmpty() ? "" : " Solid purple line: a stop of the job (requested,"
                        + " carried out, or only proposed).");
        return new Chart(id, spec, legend, caption);
    }

    /** A monitor's plot: its last value per bucket with the bucket's range, the settled band, the forecast. */
    static Chart monitor(String id, String name, History.Track t, List<Event> events, double predicted) {
        ObjectNode spec = base(id, "iteration", name, false);
        List<Line> legend = new ArrayList<>();
        ArrayNode x = spec.putArray("x");
        for (int i = 0; i < t.size(); i++) {
            x.add(t.mid(i));
        }
        ArrayNode series = spec.putArray("series");
        series.add(seriesNode("highest in bucket", t, 'M', "#9ab7cf", new int[0], 1));
        series.add(seriesNode("lowest in bucket", t, 'm', "#9ab7cf", new int[0], 1));
        series.add(seriesNode(name, t, 'l', Palette.colour(0), new int[0], 2));
        ArrayNode bands = spec.putArray("bands");
        bands.addObject().put("upper", 1).put("lower", 2).put("fill", "rgba(86,180,233,0.18)");
        legend.add(new Line(name + " (last value of each bucket)", Palette.colour(0), new int[0], 2));
        legend.add(new Line("range within each bucket", "#9ab7cf", new int[0], 6));
        ArrayNode bandSpans = spec.putArray("settled");
        String bandText = "";
        Map<String, Event> opened = new HashMap<>();
        for (Event e : events) {
            if (!e.is("detection") || !name.equals(e.monitor())) {
                continue;
            }
            String p = e.pattern();
            if (!"monitor-settled".equals(p) && !"monitor-periodic".equals(p)) {
                continue;
            }
            if (e.state().equals("open")) {
                opened.put(p, e);
            } else if (e.state().equals("resolved") && opened.containsKey(p)) {
                addBand(bandSpans, opened.remove(p), e.iter());
            }
        }
        for (Event e : opened.values()) {
            addBand(bandSpans, e, -1);
            bandText = bandDescription(e);
        }
        if (!bandSpans.isEmpty()) {
            legend.add(new Line("settled or periodic band (hatched)", "#0072B2", new int[0], 6));
        }
        if (Double.isFinite(predicted)) {
            legend.add(new Line("predicted final value", "#000000", new int[] {10, 4, 2, 4}, 1.5));
            spec.put("predicted", Numbers.round4(predicted));
            spec.put("predictedLabel", "predicted final \u2248 " + Numbers.show(predicted));
        }
        spec.set("spans", spans(events, e -> name.equals(e.monitor())));
        String caption = name + ": last value of each bucket of " + Numbers.count(t.width()) + " iteration"
                + (t.width() == 1 ? "" : "s") + ", the bucket's range shaded around it."
                + (bandSpans.isEmpty() ? " No settled or periodic band in the timeline." : " Hatched: the settled band" + (bandText.isEmpty()
                        ? "" : " (" + bandText + ")") + ".")
                + (Double.isFinite(predicted) ? " Dashed line: predicted final value " + Numbers.show(predicted)
                        + "." : " No predicted final value.");
        return new Chart(id, spec, legend, caption);
    }

    private static void addBand(ArrayNode bands, Event e, long until) {
        JsonNode ev = e.evidence();
        double centre;
        double half;
        String kind;
        if ("monitor-periodic".equals(e.pattern())) {
            centre = Numbers.of(ev.get("cycle_mean"));
            half = Numbers.of(ev.get("amplitude"));
            kind = "periodic: cycle mean \u00b1 amplitude";
        } else {
            centre = Numbers.of(ev.get("mean"));
            half = Numbers.of(ev.get("half_width"));
            kind = "settled: mean \u00b1 half-width";
        }
        if (!Double.isFinite(centre) || !Double.isFinite(half)) {
            return;
        }
        ObjectNode b = bands.addObject();
        b.put("x0", e.iter());
        if (until >= 0) {
            b.put("x1", until);
        } else {
            b.putNull("x1");
        }
        b.put("lo", centre - Math.abs(half));
        b.put("hi", centre + Math.abs(half));
        b.put("label", kind);
    }

    static String bandDescription(Event e) {
        JsonNode ev = e.evidence();
        if ("monitor-periodic".equals(e.pattern())) {
            return "periodic since iteration " + e.iter() + ": cycle mean " + Numbers.show(Numbers.of(ev.get(
                    "cycle_mean"))) + " \u00b1 " + Numbers.show(Numbers.of(ev.get("amplitude")));
        }
        return "settled since iteration " + e.iter() + ": " + Numbers.show(Numbers.of(ev.get("mean"))) + " \u00b1 "
                + Numbers.show(Numbers.of(ev.get("half_width")));
    }

    /**
     * Unsteady runs: per time step the residual at the first inner iteration (peak) and at the last (floor),
     * with the residual plot's condition spans and stops placed at their time steps (through the history's
     * step starts; none when the history has no step map).
     */
    static Chart steps(String id, History h, List<Event> events) {
        ObjectNode spec = base(id, "time step", "residual", true);
        Map<String, History.Track> both = new java.util.LinkedHashMap<>();
        h.peaks().forEach((k, v) -> both.put(k + " peak", v));
        h.floors().forEach((k, v) -> both.put(k + " floor", v));
        // peaks solid, floors dotted, the same colour for one equation
        List<String> eqs = new ArrayList<>(h.peaks().keySet());
        h.floors().keySet().forEach(k -> {
            if (!eqs.contains(k)) {
                eqs.add(k);
            }
        });
        TreeSet<Long> xs = new TreeSet<>();
        both.values().forEach(t -> {
            for (int i = 0; i < t.size(); i++) {
                xs.add(t.mid(i));
            }
        });
        long[] xa = xs.stream().mapToLong(Long::longValue).toArray();
        ArrayNode x = spec.putArray("x");
        for (long v : xa) {
            x.add(v);
        }
        ArrayNode series = spec.putArray("series");
        List<Line> legend = new ArrayList<>();
        for (int e = 0; e < eqs.size(); e++) {
            String eq = eqs.get(e);
            String colour = Palette.colour(e);
            History.Track p = h.peaks().get(eq);
            History.Track f = h.floors().get(eq);
            if (p != null) {
                series.add(aligned(eq + " peak", p, xa, colour, new int[0], 1.6));
                legend.add(new Line(eq + " peak (first inner iteration)", colour, new int[0], 1.6));
            }
            if (f != null) {
                int[] dotted = {2, 3};
                series.add(aligned(eq + " floor", f, xa, colour, dotted, 1.6));
                legend.add(new Line(eq + " floor (last inner iteration)", colour, dotted, 1.6));
            }
        }
        ArrayNode levels = spec.putArray("levels");
        for (double l : LEVELS) {
            levels.add(l);
        }
        boolean placed = h.knowsSteps();
        spec.set("spans", placed ? atSteps(h, spans(events, e -> e.monitor() == null
                && !isMonitorPattern(e.pattern()))) : JSON.createArrayNode());
        spec.set("actions", placed ? actionsAtSteps(h, actions(events)) : JSON.createArrayNode());
        long width = both.values().stream().mapToLong(History.Track::width).max().orElse(1);
        String caption = "Per time step: the residual at the step's first inner iteration (peak, solid) and at its"
                + " last (floor, dotted); highest value in each bucket of " + Numbers.count(width) + " step"
                + (width == 1 ? "" : "s") + ", log axis. Peaks climbing step after step mean the step is too large"
                + " for the scheme."
                + (placed ? " Conditions and stops are marked at the time step of their iteration, as on the"
                        + " residual plot." : " Conditions are not marked here: this history has no map from"
                        + " iterations to time steps (written by an older watcher).");
        return new Chart(id, spec, legend, caption);
    }

    /** Spans with their iterations replaced by time steps; a span whose opening has no step is left out. */
    private static ArrayNode atSteps(History h, ArrayNode spans) {
        ArrayNode out = JSON.createArrayNode();
        for (JsonNode s : spans) {
            long x0 = h.stepOf(s.path("x0").asLong());
            if (x0 < 0) {
                continue;
            }
            ObjectNode o = ((ObjectNode) s).deepCopy();
            o.put("x0", x0);
            o.put("iter0", s.path("x0").asLong());
            if (!s.path("x1").isNull()) {
                // a resolution before the first step is not possible after an opening inside one
                o.put("x1", Math.max(x0, h.stepOf(s.path("x1").asLong())));
                o.put("iter1", s.path("x1").asLong());
            }
            out.add(o);
        }
        return out;
    }

    private static ArrayNode actionsAtSteps(History h, ArrayNode actions) {
        ArrayNode out = JSON.createArrayNode();
        for (JsonNode a : actions) {
            long x = h.stepOf(a.path("x").asLong());
            if (x >= 0) {
                out.add(((ObjectNode) a).deepCopy().put("x", x).put("iter", a.path("x").asLong()));
            }
        }
        return out;
    }

    private static ObjectNode base(String id, String xLabel, String yLabel, boolean log) {
        ObjectNode spec = JSON.createObjectNode();
        spec.put("id", id);
        spec.put("xLabel", xLabel);
        spec.put("yLabel", yLabel);
        spec.put("log", log);
        return spec;
    }

    /** Series of a group on the union of their x values; highest value per bucket; one style per name. */
    private static List<Line> lines(ObjectNode spec, Map<String, History.Track> tracks) {
        TreeSet<Long> xs = new TreeSet<>();
        tracks.values().forEach(t -> {
            for (int i = 0; i < t.size(); i++) {
                xs.add(t.mid(i));
            }
        });
        long[] xa = xs.stream().mapToLong(Long::longValue).toArray();
        ArrayNode x = spec.putArray("x");
        for (long v : xa) {
            x.add(v);
        }
        ArrayNode series = spec.putArray("series");
        List<Line> legend = new ArrayList<>();
        int i = 0;
        for (Map.Entry<String, History.Track> e : tracks.entrySet()) {
            String colour = Palette.colour(i);
            int[] dash = Palette.dash(i);
            series.add(aligned(e.getKey(), e.getValue(), xa, colour, dash, 1.6));
            legend.add(new Line(e.getKey(), colour, dash, 1.6));
            i++;
        }
        return legend;
    }

    /** A series' highest value per bucket placed on the shared x values (null where it has none). */
    private static ObjectNode aligned(String label, History.Track t, long[] xa, String colour, int[] dash,
            double width) {
        ObjectNode s = style(label, colour, dash, width);
        ArrayNode y = s.putArray("y");
        ArrayNode nf = s.putArray("nf");
        int j = 0;
        for (long xv : xa) {
            while (j < t.size() && t.mid(j) < xv) {
                j++;
            }
            if (j < t.size() && t.mid(j) == xv) {
                double v = t.max()[j];
                if (!Double.isFinite(v)) {
                    nf.add(xv);
                    y.addNull();
                } else if (v <= 0) {
                    y.addNull(); // a log axis has no place for zero
                } else {
                    y.add(Numbers.round4(v));
                }
            } else {
                y.addNull();
            }
        }
        return s;
    }

    /** One column of a monitor's buckets: {@code M} max, {@code m} min, {@code l} last; non-finite as gaps. */
    private static ObjectNode seriesNode(String label, History.Track t, char which, String colour, int[] dash,
            double width) {
        ObjectNode s = style(label, colour, dash, width);
        ArrayNode y = s.putArray("y");
        ArrayNode nf = s.putArray("nf");
        for (int i = 0; i < t.size(); i++) {
            double v = which == 'M' ? t.max()[i] : which == 'm' ? t.min()[i] : t.last()[i];
            if (!Double.isFinite(v)) {
                y.addNull();
                if (which == 'l') {
                    nf.add(t.mid(i));
                }
            } else {
                y.add(Numbers.round4(v));
            }
        }
        return s;
    }

    private static ObjectNode style(String label, String colour, int[] dash, double width) {
        ObjectNode s = JSON.createObjectNode();
        s.put("label", label);
        s.put("color", colour);
        ArrayNode d = s.putArray("dash");
        for (int v : dash) {
            d.add(v);
        }
        s.put("width", width);
        return s;
    }

    static boolean isMonitorPattern(String p) {
        return "monitor-settled".equals(p) || "monitor-periodic".equals(p);
    }

    /**
     * Open/resolved pairs of the detections {@code which} accepts, as spans: {@code n} the opening event's
     * number, {@code x0} where it opened, {@code x1} where it resolved (null: still open), {@code sev},
     * {@code pat}. Info events that open nothing (level crossings) are not spans.
     */
    static ArrayNode spans(List<Event> events, java.util.function.Predicate<Event> which) {
        record Span(Event open, Event resolved) {
        }
        List<Span> all = new ArrayList<>();
        Map<String, Event> open = new HashMap<>();
        for (Event e : events) {
            if (!e.is("detection") || !which.test(e)) {
                continue;
            }
            if (e.state().equals("open")) {
                Event prev = open.put(e.conditionKey(), e);
                if (prev != null) {
                    all.add(new Span(prev, null));
                }
            } else if (e.state().equals("resolved")) {
                Event o = open.remove(e.conditionKey());
                if (o != null) {
                    all.add(new Span(o, e));
                }
            }
        }
        open.values().forEach(o -> all.add(new Span(o, null)));
        List<Span> kept = all;
        if (all.size() > MAX_SPANS) {
            kept = new ArrayList<>(all);
            kept.sort(Comparator.comparingInt((Span s) -> -rank(s.open().severity()))
                    .thenComparingLong(s -> s.open().seq()));
            kept = kept.subList(0, MAX_SPANS);
        }
        kept = new ArrayList<>(kept);
        kept.sort(Comparator.comparingLong(s -> s.open().iter()));
        ArrayNode out = JSON.createArrayNode();
        for (Span s : kept) {
            ObjectNode o = out.addObject();
            o.put("n", s.open().seq());
            o.put("x0", s.open().iter());
            if (s.resolved() != null) {
                o.put("x1", s.resolved().iter());
                o.put("rn", s.resolved().seq());
            } else {
                o.putNull("x1");
            }
            o.put("sev", s.open().severity());
            o.put("pat", s.open().pattern());
        }
        return out;
    }

    /** Stops of the job, one mark per iteration (the last state there): {@code x}, {@code label}, {@code n}. */
    static ArrayNode actions(List<Event> events) {
        Map<Long, Event> byIter = new java.util.TreeMap<>();
        for (Event e : events) {
            if (e.is("action") && List.of("would-stop", "requested", "signalled", "done").contains(e.state())) {
                byIter.put(e.iter(), e);
            }
        }
        ArrayNode out = JSON.createArrayNode();
        int kept = 0;
        for (Event e : byIter.values()) {
            if (++kept > MAX_SPANS) {
                break;
            }
            String label = switch (e.state()) {
                case "would-stop" -> "would stop";
                case "requested" -> "stop requested";
                default -> "stopped";
            };
            out.addObject().put("x", e.iter()).put("n", e.seq()).put("label", label);
        }
        return out;
    }

    static int rank(String severity) {
        return switch (severity) {
            case "critical" -> 2;
            case "warning" -> 1;
            default -> 0;
        };
    }
}
