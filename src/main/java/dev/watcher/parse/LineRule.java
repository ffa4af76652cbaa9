package dev.watcher.parse;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Set;
import java.util.regex.Pattern;

/**
 * One rule of a line format: a regular expression tried on each line, what a matching line does, and
 * further expressions found repeatedly in the rest of the line (several equations on one line).
 *
 * @param match  the expression; its named groups give the values (see {@link #GROUPS})
 * @param action what a matching line does
 * @param finds  expressions found repeatedly after the match, each yielding one equation or one monitor;
 *               a part of the line used by an earlier expression is not used again
 * @param groups the named groups {@code match} declares
 */
record LineRule(Pattern match, Action action, List<Pattern> finds, Set<String> groups) {

    /** Named groups a rule may use. */
    static final List<String> GROUPS = List.of("iteration", "step", "time", "inner", "equation", "residual",
            "monitor", "value", "region");

    /** Named groups a {@code find} expression may use. */
    static final List<String> FIND_GROUPS = List.of("equation", "residual", "monitor", "value", "region");

    /** What a matching line does. */
    enum Action {
        /** The line is a whole record: completes any open record, then makes and completes its own. */
        RECORD,
        /** The line opens a record (completing any open one); following lines add to it. */
        OPEN,
        /** The line adds values to the open record (opening one if none is open). */
        VALUES,
        /** The line adds its values, if any, and completes the open record. */
        CLOSE,
        /** The line completes any open record and sets step/time/inner for the following records. */
        CONTEXT,
        /** The line declares a solver restart: completes any open record; a new segment starts. */
        RESTART,
        /** The line is skipped (banners, warnings). */
        IGNORE;

        String id() {
            return name().toLowerCase(Locale.ROOT);
        }

        static Action of(String s) {
            for (Action a : values()) {
                if (a.id().equals(s)) {
                    return a;
                }
            }
            return null;
        }

        static String ids() {
            List<String> ids = new ArrayList<>();
            for (Action a : values()) {
                ids.add(a.id());
            }
            return String.join(", ", ids);
        }
    }

    LineRule {
        finds = List.copyOf(finds);
        groups = Set.copyOf(groups);
    }

    boolean has(String group) {
        return groups.contains(group);
    }

    /**
     * The named groups a regular expression declares, in order: {@code (?<name>...)} outside character
     * classes and not escaped (Java 17 has no API that lists them).
     */
    static List<String> namedGroups(String regex) {
        List<String> names = new ArrayList<>();
        boolean inClass = false;
        for (int i = 0; i < regex.length(); i++) {
            char c = regex.charAt(i);
            if (c == '\\') {
                if (i + 1 < regex.length() && regex.charAt(i + 1) == 'Q') {
                    int e = regex.indexOf("\\E", i + 2);
                    i = e < 0 ? regex.length() : e + 1;
                } else {
                    i++;
                }
            } else if (inClass) {
                if (c == ']') {
                    inClass = false;
                }
            } else if (c == '[') {
                inClass = true;
                if (i + 1 < regex.length() && regex.charAt(i + 1) == ']') {
                    i++; // "[]...]": a leading ] is literal
                }
            } else if (c == '(' && regex.startsWith("?<", i + 1) && i + 3 < regex.length()
                    && Character.isLetter(regex.charAt(i + 3))) {
                int e = regex.indexOf('>', i + 3);
                if (e > 0) {
                    names.add(regex.substring(i + 3, e));
                }
            }
        }
        return names;
    }
}
