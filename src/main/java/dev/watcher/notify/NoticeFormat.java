package dev.watcher.notify;

import dev.watcher.model.Detection;
import dev.watcher.model.Notice;
import dev.watcher.model.NoticeKind;
import io.vertx.core.json.JsonArray;
import io.vertx.core.json.JsonObject;
import java.net.URLEncoder;
import java.nio.charset.StandardCharsets;
import java.time.format.DateTimeFormatter;
import java.util.Locale;
import java.util.Map;

/**
 * The words and bytes of a notice on the wire: our own JSON body, the CloudEvents 1.0 envelope, the
 * {@code {"text": ...}} body for chat services, and the mail subject and body. Pure and thread-safe.
 */
final class NoticeFormat {

    /** Body styles a webhook may ask for. */
    static final String NATIVE = "native";
    static final String CLOUDEVENTS = "cloudevents";
    static final String TEXT = "text";

    /** Prefix of our CloudEvents types; the notice kind follows ({@code dev.watcher.notice.opened}). */
    static final String EVENT_TYPE_PREFIX = "dev.watcher.notice.";

    private static final int SUBJECT_RUN_MAX = 40;

    private NoticeFormat() {
    }

    /** Validates a body style; null means {@link #NATIVE}. */
    static String bodyStyle(String style) {
        String s = style == null ? NATIVE : style.strip().toLowerCase(Locale.ROOT);
        if (!s.equals(NATIVE) && !s.equals(CLOUDEVENTS) && !s.equals(TEXT)) {
            throw new IllegalArgumentException("webhook body must be native, cloudevents or text, got '" + style
                    + "'");
        }
        return s;
    }

    /** The Content-Type for a body style. */
    static String contentType(String style) {
        return CLOUDEVENTS.equals(style) ? "application/cloudevents+json; charset=utf-8"
                : "application/json; charset=utf-8";
    }

    /** The request body for a body style, as UTF-8 bytes (these exact bytes are signed). */
    static byte[] body(String style, Notice n) {
        JsonObject json = switch (style) {
            case CLOUDEVENTS -> cloudEvent(n);
            case TEXT -> new JsonObject().put("text", chatText(n));
            default -> nativeJson(n);
        };
        return json.encode().getBytes(StandardCharsets.UTF_8);
    }

    /** Our own JSON description of a notice (lower_snake_case keys, as in the timeline). */
    static JsonObject nativeJson(Notice n) {
        JsonObject o = new JsonObject();
        o.put("notice_id", n.id());
        o.put("run", n.run());
        o.put("kind", n.kind().id());
        o.put("severity", n.severity().id());
        o.put("pattern", n.pattern());
        o.put("subject", n.subject());
        o.put("summary", n.summary());
        o.put("remedy", n.remedy());
        o.put("iter", n.iter());
        o.put("created", n.created() == null ? null : DateTimeFormatter.ISO_INSTANT.format(n.created()));
        Detection lead = n.detections().isEmpty() ? null : n.detections().get(0);
        o.put("equations", lead == null ? new JsonArray() : new JsonArray(lead.equations()));
        o.put("monitor", lead == null ? null : lead.monitor());
        o.put("evidence", lead == null ? new JsonObject() : finite(lead.evidence()));
        o.put("last_values", lastValues(n.lastValues()));
        JsonArray ds = new JsonArray();
        for (Detection d : n.detections()) {
            ds.add(detectionJson(d));
        }
        o.put("detections", ds);
        return o;
    }

    /**
     * A CloudEvents 1.0 structured-mode JSON envelope: the required {@code id} (the notice id),
     * {@code source}, {@code specversion} and {@code type}, with {@code time}, {@code subject} (the run),
     * {@code datacontenttype} and our native JSON as {@code data}.
     */
    static JsonObject cloudEvent(Notice n) {
        JsonObject o = new JsonObject();
        o.put("specversion", "1.0");
        o.put("id", n.id());
        o.put("source", "/watcher/runs/" + URLEncoder.encode(n.run(), StandardCharsets.UTF_8).replace("+", "%20"));
        o.put("type", EVENT_TYPE_PREFIX + n.kind().id());
        if (n.created() != null) {
            o.put("time", DateTimeFormatter.ISO_INSTANT.format(n.created()));
        }
        o.put("subject", n.run());
        o.put("datacontenttype", "application/json");
        o.put("data", nativeJson(n));
        return o;
    }

    /** A few lines for a chat service. */
    static String chatText(Notice n) {
        StringBuilder b = new StringBuilder(subject(n));
        if (!n.summary().isBlank()) {
            b.append('\n').append(n.summary());
        }
        if (!n.remedy().isBlank()) {
            b.append("\nRemedy: ").append(n.remedy());
        }
        if (!n.lastValues().isEmpty()) {
            b.append("\nLast values: ");
            boolean first = true;
            for (Map.Entry<String, Double> e : n.lastValues().entrySet()) {
                b.append(first ? "" : ", ").append(e.getKey()).append(' ').append(number(e.getValue()));
                first = false;
            }
        }
        return b.toString();
    }

    /** A short mail subject: severity, run and pattern, and whether it is a reminder or a resolve. */
    static String subject(Notice n) {
        String run = n.run().length() > SUBJECT_RUN_MAX ? n.run().substring(0, SUBJECT_RUN_MAX - 1) + "~" : n.run();
        String what = n.pattern() != null ? n.pattern() : (n.subject() == null ? "notice" : n.subject());
        String tail = switch (n.kind()) {
            case RESOLVED -> " resolved";
            case REMINDER -> " (still open)";
            default -> "";
        };
        return "[" + n.severity().id() + "] " + run + ": " + what + tail;
    }

    /** The plain-text mail body: summary, remedy, evidence, last values, other grouped detections. */
    static String mailBody(Notice n) {
        StringBuilder b = new StringBuilder();
        b.append(n.kind() == NoticeKind.RESOLVED ? "Cleared" : "Run").append(": ").append(n.run())
                .append(" (iteration ").append(n.iter()).append(")\n");
        if (n.pattern() != null) {
            b.append("Pattern: ").append(n.pattern()).append('\n');
        }
        b.append("Severity: ").append(n.severity().id()).append("\n\n");
        b.append("Summary: ").append(n.summary()).append('\n');
        if (!n.remedy().isBlank()) {
            b.append("Remedy: ").append(n.remedy()).append('\n');
        }
        if (!n.detections().isEmpty()) {
            Detection lead = n.detections().get(0);
            if (!lead.equations().isEmpty()) {
                b.append("Equations: ").append(String.join(", ", lead.equations())).append('\n');
            }
            if (lead.monitor() != null) {
                b.append("Monitor: ").append(lead.monitor()).append('\n');
            }
            if (!lead.evidence().isEmpty()) {
                b.append("\nEvidence:\n");
                lead.evidence().forEach((k, v) -> b.append("  ").append(k).append(": ").append(v).append('\n'));
            }
        }
        if (!n.lastValues().isEmpty()) {
            b.append("\nLast values:\n");
            n.lastValues().entrySet().stream().sorted(Map.Entry.comparingByKey())
                    .forEach(e -> b.append("  ").append(e.getKey()).append(": ").append(number(e.getValue()))
                            .append('\n'));
        }
        if (n.detections().size() > 1) {
            b.append("\nAlso grouped in this notice:\n");
            for (Detection d : n.detections().subList(1, n.detections().size())) {
                b.append("  - ").append(d.pattern()).append(": ").append(d.summary()).append('\n');
            }
        }
        b.append("\nNotice id: ").append(n.id()).append('\n');
        return b.toString();
    }

    static JsonObject detectionJson(Detection d) {
        return new JsonObject().put("pattern", d.pattern()).put("state", d.state().id())
                .put("severity", d.severity().id()).put("iter", d.iter())
                .put("equations", new JsonArray(d.equations())).put("monitor", d.monitor())
                .put("summary", d.summary()).put("remedy", d.remedy())
                .put("evidence", finite(d.evidence()));
    }

    private static JsonObject lastValues(Map<String, Double> values) {
        JsonObject o = new JsonObject();
        // sorted so that the body (and thus its signature) does not depend on map iteration order
        values.entrySet().stream().sorted(Map.Entry.comparingByKey()).forEach(e -> {
            Double v = e.getValue();
            // JSON has no NaN or infinity: say it in words
            o.put(e.getKey(), v == null || v.isNaN() || v.isInfinite() ? String.valueOf(v) : (Object) v);
        });
        return o;
    }

    /** Evidence as JSON; a non-finite number (JSON has none) becomes its word, {@code NaN} or {@code Infinity}. */
    static JsonObject finite(Map<String, Object> evidence) {
        JsonObject o = new JsonObject();
        evidence.forEach((k, v) -> {
            if (v instanceof Double d && (d.isNaN() || d.isInfinite())) {
                o.put(k, d.toString());
            } else if (v instanceof Float f && (f.isNaN() || f.isInfinite())) {
                o.put(k, f.toString());
            } else {
                o.put(k, v);
            }
        });
        return o;
    }

    private static String number(Double v) {
        return v == null ? "null" : String.format(Locale.ROOT, "%.6g", v);
    }
}
