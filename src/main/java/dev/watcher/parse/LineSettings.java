package dev.watcher.parse;

import java.util.List;

/**
 * How to read a line format.
 *
 * @param common             shared settings
 * @param rules              tried in order on each line; the first whose expression is found applies
 * @param unmatchedMalformed whether a line no rule matches is counted as {@code bad-shape} (else skipped)
 * @param countsRecords      true when no rule has an {@code iteration} group: records are numbered 1, 2, 3...
 */
record LineSettings(Common common, List<LineRule> rules, boolean unmatchedMalformed, boolean countsRecords) {

    LineSettings {
        rules = List.copyOf(rules);
    }
}
