package dev.watcher.parse;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.core.json.JsonReadFeature;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import dev.watcher.model.ParseSink;
import java.io.IOException;

/**
 * Reads the canonical JSON Lines input (CONTRACT.md): one object per line with {@code iter} (required),
 * optional {@code step}, {@code time}, {@code inner}, and the objects {@code residuals} and
 * {@code monitors} whose values are numbers or the strings "NaN", "Infinity", "-Infinity" (any spelling
 * {@link Numbers} accepts). Unknown keys are ignored. A line that is not such an object is counted
 * ({@code bad-shape}), one without {@code iter} too ({@code missing-field}), one with a value that is not a
 * number too ({@code bad-number}); each is skipped whole.
 */
final class JsonlParser implements LineParser, LinePieces.Piece {

    private static final JsonFactory JSON = JsonFactory.builder()
            .enable(JsonReadFeature.ALLOW_NON_NUMERIC_NUMBERS)
            .enable(JsonReadFeature.ALLOW_LEADING_PLUS_SIGN_FOR_NUMBERS)
            .build();

    private final Common common;
    private final Segments segments = new Segments();
    private final Assembly residuals;
    private final Assembly monitors;
    private long lineNo;
    private ParseSink sink;

    JsonlParser(Common common) {
        this.common = common;
        this.residuals = new Assembly(common.repeated());
        this.monitors = new Assembly(common.repeated());
    }

    @Override
    public void accept(CharSequence line, long lineNo, ParseSink sink) {
        this.lineNo = lineNo;
        this.sink = sink;
        LinePieces.split(line, this);
        this.sink = null;
    }

    /** A problem with one line; carries what to count. */
    private static final class Bad extends Exception {
        private static final long serialVersionUID = 1L;
        final transient Malformed kind;

        Bad(Malformed kind, String detail) {
            super(detail, null, false, false);
            this.kind = kind;
        }
    }

    @Override
    public void accept(CharSequence line, int from, int to, int rank) {
        if (!common.readsRank(rank)) {
            return;
        }
        String text = line.subSequence(from, to).toString();
        try (JsonParser p = JSON.createParser(text)) {
            parseRecord(p);
        } catch (Bad e) {
            sink.malformed(e.kind, lineNo, LinePieces.clip(e.getMessage(), 200));
        } catch (IOException | RuntimeException e) {
            // Jackson reports bad JSON as an IOException subclass; its message is long, keep its first line.
            String m = String.valueOf(e.getMessage());
            int nl = m.indexOf('\n');
            sink.malformed(Malformed.BAD_SHAPE, lineNo,
                    "not a JSON object: " + LinePieces.clip(nl < 0 ? m : m.substring(0, nl), 160));
        }
    }

    private void parseRecord(JsonParser p) throws IOException, Bad {
        if (p.nextToken() != JsonToken.START_OBJECT) {
            throw new Bad(Malformed.BAD_SHAPE, "expected a JSON object");
        }
        long iter = -1;
        long step = IterationRecord.NONE;
        long inner = IterationRecord.NONE;
        double time = Double.NaN;
        residuals.begin();
        monitors.begin();
        JsonToken t;
        while ((t = p.nextToken()) == JsonToken.FIELD_NAME) {
            String key = p.currentName();
            JsonToken v = p.nextToken();
            switch (key) {
                case "iter":
                    iter = counter(p, v, key);
                    break;
                case "step":
                    step = counter(p, v, key);
                    break;
                case "inner":
                    inner = counter(p, v, key);
                    break;
                case "time":
                    time = number(p, v, key);
                    break;
                case "residuals":
                    values(p, v, key, residuals);
                    break;
                case "monitors":
                    values(p, v, key, monitors);
                    break;
                default:
                    p.skipChildren(); // unknown keys are ignored (CONTRACT.md)
            }
        }
        if (t != JsonToken.END_OBJECT) {
            throw new Bad(Malformed.BAD_SHAPE, "expected a JSON object");
        }
        if (p.nextToken() != null) {
            throw new Bad(Malformed.BAD_SHAPE, "text after the JSON object");
        }
        if (iter < 0) {
            throw new Bad(Malformed.MISSING_FIELD, "no \"iter\"");
        }
        int segment = segments.before(iter, lineNo, sink);
        sink.record(new IterationRecord(iter, step, time, inner, residuals.finish(), monitors.finish(), segment,
                lineNo));
    }

    private static long counter(JsonParser p, JsonToken v, String key) throws IOException, Bad {
        if (v == JsonToken.VALUE_NUMBER_INT) {
            long l = p.getLongValue();
            if (l >= 0) {
                return l;
            }
        } else if (v == JsonToken.VALUE_NUMBER_FLOAT) {
            double d = p.getDoubleValue();
            if (d >= 0 && d == Math.rint(d) && d < 9.0e15) {
                return (long) d;
            }
        }
        p.skipChildren();
        throw new Bad(Malformed.BAD_NUMBER, "\"" + key + "\" is not a non-negative integer");
    }

    private static double number(JsonParser p, JsonToken v, String key) throws IOException, Bad {
        if (v == JsonToken.VALUE_NUMBER_INT || v == JsonToken.VALUE_NUMBER_FLOAT) {
            return p.getDoubleValue();
        }
        if (v == JsonToken.VALUE_STRING) {
            double d = Numbers.parse(p.getText());
            if (!Numbers.isMalformed(d)) {
                return d;
            }
            throw new Bad(Malformed.BAD_NUMBER, "\"" + key + "\": \"" + p.getText() + "\" is not a number");
        }
        p.skipChildren();
        throw new Bad(Malformed.BAD_NUMBER, "\"" + key + "\" is not a number");
    }

    private static void values(JsonParser p, JsonToken v, String key, Assembly into) throws IOException, Bad {
        if (v == JsonToken.VALUE_NULL) {
            return;
        }
        if (v != JsonToken.START_OBJECT) {
            p.skipChildren();
            throw new Bad(Malformed.BAD_SHAPE, "\"" + key + "\" is not an object");
        }
        while (p.nextToken() == JsonToken.FIELD_NAME) {
            String name = p.currentName();
            JsonToken t = p.nextToken();
            into.put(name, number(p, t, key + "." + name));
        }
    }
}
