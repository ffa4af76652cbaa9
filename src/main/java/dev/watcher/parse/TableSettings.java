package dev.watcher.parse;

import java.util.List;

/**
 * How to read a delimited table with a header line.
 *
 * @param common     shared settings
 * @param delimiter  the field separator, or {@code 0} for runs of blanks
 * @param comment    the comment prefix ("" for none); a commented line may still be the header
 * @param columns    column names for a table without a header line (empty: the header line gives them)
 * @param iteration  the iteration column's name, or null for "the first column"
 * @param step       the time-step column's name, or null
 * @param time       the physical-time column's name, or null
 * @param inner      the inner-iteration column's name, or null
 * @param residuals  columns that are residuals (an entry ending in {@code *} matches a prefix), or null
 * @param monitors   columns that are monitors (same matching), or null
 * @param unlisted   what the columns named in neither list are
 * @param reprintedHeaderStartsSegment whether a header line after the first (same or changed) starts a new
 *                   segment (a solver restart that continues the iteration count)
 */
record TableSettings(Common common, char delimiter, String comment, List<String> columns, String iteration,
        String step, String time, String inner, List<String> residuals, List<String> monitors, Role unlisted,
        boolean reprintedHeaderStartsSegment) {

    /** What a column holds. */
    enum Role {
        RESIDUAL, MONITOR, IGNORE
    }

    TableSettings {
        columns = List.copyOf(columns);
        residuals = residuals == null ? null : List.copyOf(residuals);
        monitors = monitors == null ? null : List.copyOf(monitors);
    }

    /** The built-in {@code table}: blanks between fields, {@code #} comments, first column the iteration. */
    static TableSettings builtIn() {
        return new TableSettings(Common.named("table"), (char) 0, "#", List.of(), null, null, null, null, null,
                null, Role.RESIDUAL, true);
    }

    Role roleOf(String column) {
        if (matches(residuals, column)) {
            return Role.RESIDUAL;
        }
        if (matches(monitors, column)) {
            return Role.MONITOR;
        }
        return unlisted;
    }

    private static boolean matches(List<String> list, String column) {
        if (list == null) {
            return false;
        }
        for (String e : list) {
            if (e.endsWith("*") ? column.startsWith(e.substring(0, e.length() - 1)) : e.equals(column)) {
                return true;
            }
        }
        return false;
    }
}
