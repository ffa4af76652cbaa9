package dev.watcher.live;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.model.Severity;
import dev.watcher.model.TimelineEvent;
import java.time.ZoneOffset;
import java.time.format.DateTimeFormatter;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The JSON the page reads. JSON has no NaN or infinity: such numbers travel as the strings "NaN",
 * "Infinity" and "-Infinity" (as in the timeline), which the page turns back into numbers.
 */
final class LiveJson {

    private static final ObjectMapper JSON = new ObjectMapper();
    private static final DateTimeFormatter AT = DateTimeFormatter.ofPattern("yyyy-MM-dd'T'HH:mm:ss.SSS'Z'")
            .withZone(ZoneOffset.UTC);

    private LiveJson() {
    }

    static String write(Object value) {
        try {
            return JSON.writeValueAsString(sanitize(value));
        } catch (JsonProcessingException e) {
            throw new IllegalStateException("cannot encode live JSON", e);
        }
    }

    static Map<String, Object> status(RunStatus s) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("run", s.run());
        m.put("state", s.state());
        m.put("iter", s.lastIter());
        m.put("residuals", s.residuals());
        m.put("monitors", s.monitors());
        m.put("open", s.openConditions());
        m.put("lines", s.lines());
        m.put("records", s.records());
        m.put("malformed", s.malformed());
        m.put("forecast", forecast(s.forecast()));
        return m;
    }

    /**
     * The forecast table's data. A value not known is left out (rather than sent as "NaN"): {@code seconds}
     * appear only once the live run's iteration rate is known, {@code iterations} only for a forecast that
     * gives them.
     */
    static Map<String, Object> forecast(RunForecast f) {
        Map<String, Object> m = new LinkedHashMap<>();
        known(m, "iterations_per_second", f.iterationsPerSecond());
        known(m, "rate_seconds", f.rateSeconds());
        m.put("verdict", f.verdict());
        m.put("waiting_for", f.waitingFor());
        List<Object> eqs = new ArrayList<>(f.equations().size());
        for (RunForecast.Equation e : f.equations()) {
            Map<String, Object> q = new LinkedHashMap<>();
            q.put("name", e.name());
            q.put("status", e.status());
            known(q, "target", e.target());
            known(q, "iterations", e.iterations());
            known(q, "iterations_low", e.iterationsLow());
            known(q, "iterations_high", e.iterationsHigh());
            known(q, "seconds", e.seconds());
            known(q, "seconds_low", e.secondsLow());
            known(q, "seconds_high", e.secondsHigh());
            eqs.add(q);
        }
        m.put("equations", eqs);
        List<Object> mons = new ArrayList<>(f.monitors().size());
        for (RunForecast.Monitor x : f.monitors()) {
            Map<String, Object> q = new LinkedHashMap<>();
            q.put("name", x.name());
            q.put("state", x.state());
            known(q, "value", x.value());
            known(q, "predicted_final", x.predictedFinal());
            known(q, "remaining_error", x.remainingError());
            mons.add(q);
        }
        m.put("monitors", mons);
        return m;
    }

    private static void known(Map<String, Object> m, String key, double v) {
        if (Double.isFinite(v)) {
            m.put(key, v);
        }
    }

    /** The timeline event with the keys of the timeline line, in its order. */
    static Map<String, Object> event(TimelineEvent ev) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("seq", ev.seq());
        m.put("run", ev.run());
        m.put("type", ev.type() == null ? null : ev.type().id());
        m.put("at", ev.at() == null ? null : AT.format(ev.at()));
        m.put("iter", ev.iter());
        m.put("state", ev.state());
        m.put("severity", (ev.severity() == null ? Severity.INFO : ev.severity()).id());
        m.putAll(ev.fields());
        return m;
    }

    static Map<String, Object> plots(RunPlots p) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("lastIter", p.lastIter());
        m.put("residuals", traces(p.residuals()));
        m.put("monitors", traces(p.monitors()));
        List<Object> levels = new ArrayList<>(p.residualLevels().size());
        for (RunPlots.Level l : p.residualLevels()) {
            Map<String, Object> lm = new LinkedHashMap<>();
            lm.put("value", l.value());
            lm.put("label", l.label());
            levels.add(lm);
        }
        m.put("residualLevels", levels);
        return m;
    }

    private static List<Object> traces(List<RunPlots.Trace> ts) {
        List<Object> out = new ArrayList<>(ts.size());
        for (RunPlots.Trace t : ts) {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("name", t.name());
            m.put("x", t.x());
            m.put("min", t.min());
            m.put("max", t.max());
            m.put("last", t.last());
            out.add(m);
        }
        return out;
    }

    private static Object sanitize(Object v) {
        if (v instanceof Double d) {
            return num(d);
        }
        if (v instanceof Float f) {
            return num(f.doubleValue());
        }
        if (v instanceof double[] a) {
            List<Object> out = new ArrayList<>(a.length);
            for (double d : a) {
                out.add(num(d));
            }
            return out;
        }
        if (v instanceof Map<?, ?> map) {
            Map<Object, Object> out = new LinkedHashMap<>();
            map.forEach((k, x) -> out.put(k, sanitize(x)));
            return out;
        }
        if (v instanceof List<?> list) {
            List<Object> out = new ArrayList<>(list.size());
            for (Object x : list) {
                out.add(sanitize(x));
            }
            return out;
        }
        return v;
    }

    private static Object num(double d) {
        if (Double.isNaN(d)) {
            return "NaN";
        }
        if (Double.isInfinite(d)) {
            return d > 0 ? "Infinity" : "-Infinity";
        }
        return d;
    }
}
