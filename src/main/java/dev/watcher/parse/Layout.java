package dev.watcher.parse;

import dev.watcher.model.LineParser;
import java.util.List;
import java.util.Map;
import java.util.function.Supplier;

/**
 * A format ready to make parsers: its shared settings, the layout's id ({@code jsonl}, {@code table},
 * {@code lines}) and how to make a parser.
 */
final class Layout implements FormatSpec {

    private final Common common;
    private final String layout;
    private final Supplier<LineParser> parsers;

    Layout(Common common, String layout, Supplier<LineParser> parsers) {
        this.common = common;
        this.layout = layout;
        this.parsers = parsers;
    }

    @Override
    public String name() {
        return common.name();
    }

    @Override
    public LineParser newParser() {
        return parsers.get();
    }

    @Override
    public Map<String, List<String>> families() {
        return common.families();
    }

    String layout() {
        return layout;
    }

    @Override
    public String toString() {
        return "format " + name() + " (layout " + layout + ")";
    }
}
