package dev.watcher.report;

import java.util.List;

/**
 * Line styles for the plots: eight colours chosen to stay apart for the common forms of colour-vision
 * deficiency (the palette of Okabe and Ito, "Color Universal Design", 2008) less its yellow, which is too
 * pale on white paper, combined with five dash patterns so that no two lines of a plot differ by colour
 * alone. Severity keeps its own colours and, always, a shape and a word.
 */
final class Palette {

    static final List<String> COLOURS = List.of("#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9",
            "#000000");
    static final List<int[]> DASHES = List.of(new int[0], new int[] {8, 4}, new int[] {2, 3}, new int[] {10, 3, 2, 3},
            new int[] {4, 4});

    private Palette() {
    }

    static String colour(int i) {
        return COLOURS.get(i % COLOURS.size());
    }

    /** The dash of line i: changes with the colour so colour and dash together identify a line. */
    static int[] dash(int i) {
        return DASHES.get(i % DASHES.size());
    }

    static String severityColour(String severity) {
        return switch (severity) {
            case "critical" -> "#D55E00";
            case "warning" -> "#B07800";
            default -> "#0072B2";
        };
    }

    /** The glyph drawn with a severity, in the table and on the plots. */
    static String severityGlyph(String severity) {
        return switch (severity) {
            case "critical" -> "\u25bc"; // ▼
            case "warning" -> "\u25c6"; // ◆
            default -> "\u25a0"; // ■
        };
    }
}
