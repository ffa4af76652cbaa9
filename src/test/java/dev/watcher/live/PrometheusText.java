package dev.watcher.live;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * A strict reader of the Prometheus text exposition format 0.0.4, as the Prometheus documentation
 * ("Exposition formats", text-based format) describes it: {@code # HELP name text}, {@code # TYPE name
 * counter|gauge|histogram|summary|untyped}, and samples {@code name{label="value",...} value [timestamp]}
 * with metric names {@code [a-zA-Z_:][a-zA-Z0-9_:]*}, label names {@code [a-zA-Z_][a-zA-Z0-9_]*}, label
 * values escaping backslash, double quote and newline, and values as Go floats ({@code NaN}, {@code +Inf},
 * {@code -Inf}). A line that fits none of these fails with its number.
 */
final class PrometheusText {

    record Sample(String name, Map<String, String> labels, double value) {
    }

    private static final Pattern HELP = Pattern.compile("# HELP ([a-zA-Z_:][a-zA-Z0-9_:]*) .*");
    private static final Pattern TYPE = Pattern.compile(
            "# TYPE ([a-zA-Z_:][a-zA-Z0-9_:]*) (counter|gauge|histogram|summary|untyped)");
    private static final Pattern NAME = Pattern.compile("[a-zA-Z_:][a-zA-Z0-9_:]*");
    private static final Pattern LABEL = Pattern.compile("([a-zA-Z_][a-zA-Z0-9_]*)=\"((?:[^\"\\\\\\n]|\\\\[\\\\\"n])*)\"");
    private static final Pattern VALUE = Pattern.compile(
            "(NaN|[+-]Inf|[+-]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][+-]?\\d+)?)(?: (-?\\d+))?");

    final Map<String, String> types = new HashMap<>();
    final List<Sample> samples = new ArrayList<>();

    static PrometheusText parse(String text) {
        PrometheusText p = new PrometheusText();
        String[] lines = text.split("\n", -1);
        for (int i = 0; i < lines.length; i++) {
            String line = lines[i];
            if (line.isEmpty()) {
                if (i == lines.length - 1) {
                    break; // the text ends with a newline
                }
                continue;
            }
            if (line.startsWith("#")) {
                Matcher t = TYPE.matcher(line);
                if (t.matches()) {
                    if (p.types.put(t.group(1), t.group(2)) != null) {
                        throw new AssertionError("line " + (i + 1) + ": second TYPE for " + t.group(1));
                    }
                } else if (!HELP.matcher(line).matches()) {
                    throw new AssertionError("line " + (i + 1) + ": not a HELP or TYPE line: " + line);
                }
                continue;
            }
            p.samples.add(p.sample(line, i + 1));
        }
        return p;
    }

    private Sample sample(String line, int no) {
        Matcher n = NAME.matcher(line);
        if (!n.lookingAt()) {
            throw new AssertionError("line " + no + ": no metric name: " + line);
        }
        String name = n.group();
        int pos = n.end();
        Map<String, String> labels = new LinkedHashMap<>();
        if (pos < line.length() && line.charAt(pos) == '{') {
            pos++;
            while (line.charAt(pos) != '}') {
                Matcher l = LABEL.matcher(line).region(pos, line.length());
                if (!l.lookingAt()) {
                    throw new AssertionError("line " + no + ": bad label at column " + (pos + 1) + ": " + line);
                }
                labels.put(l.group(1), l.group(2).replace("\\n", "\n").replace("\\\"", "\"").replace("\\\\", "\\"));
                pos = l.end();
                if (line.charAt(pos) == ',') {
                    pos++;
                }
            }
            pos++;
        }
        if (pos >= line.length() || line.charAt(pos) != ' ') {
            throw new AssertionError("line " + no + ": no space before the value: " + line);
        }
        Matcher v = VALUE.matcher(line.substring(pos + 1));
        if (!v.matches()) {
            throw new AssertionError("line " + no + ": bad value: " + line);
        }
        String family = family(name);
        if (family == null) {
            throw new AssertionError("line " + no + ": sample " + name + " has no TYPE line before it");
        }
        String s = v.group(1);
        double value = s.equals("+Inf") ? Double.POSITIVE_INFINITY
                : s.equals("-Inf") ? Double.NEGATIVE_INFINITY : Double.parseDouble(s);
        return new Sample(name, labels, value);
    }

    private String family(String name) {
        if (types.containsKey(name)) {
            return name;
        }
        for (String suffix : new String[] {"_total", "_count", "_sum", "_bucket", "_created"}) {
            if (name.endsWith(suffix) && types.containsKey(name.substring(0, name.length() - suffix.length()))) {
                return name.substring(0, name.length() - suffix.length());
            }
        }
        return null;
    }

    List<Sample> named(String name) {
        return samples.stream().filter(s -> s.name().equals(name)).toList();
    }

    /** The one sample of {@code name} whose labels include {@code labels}. */
    Sample one(String name, Map<String, String> labels) {
        List<Sample> hits = named(name).stream()
                .filter(s -> s.labels().entrySet().containsAll(labels.entrySet())).toList();
        if (hits.size() != 1) {
            throw new AssertionError("expected one " + name + labels + ", found " + hits);
        }
        return hits.get(0);
    }
}
