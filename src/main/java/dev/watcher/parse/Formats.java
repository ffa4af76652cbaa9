package dev.watcher.parse;

import dev.watcher.model.InputFileException;
import dev.watcher.parse.YamlTree.ListNode;
import dev.watcher.parse.YamlTree.MapNode;
import dev.watcher.parse.YamlTree.Node;
import dev.watcher.parse.YamlTree.Scalar;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.regex.Pattern;
import java.util.regex.PatternSyntaxException;

/**
 * The log formats: the built-ins and those read from format files (test-logs/formats/README.md documents
 * every key). Pure: the caller reads the file and passes its text.
 */
public final class Formats {

    private static final List<String> COMMON_KEYS = List.of("kind", "name", "description", "layout", "repeated",
            "families", "rank");
    private static final List<String> TABLE_KEYS = List.of("delimiter", "comment", "columns", "iteration", "step",
            "time", "inner", "residuals", "monitors", "unlisted", "reprinted-header");
    private static final List<String> LINES_KEYS = List.of("rules", "unmatched");
    private static final List<String> RULE_KEYS = List.of("match", "action", "find");

    private Formats() {
    }

    /**
     * A built-in format: {@code jsonl} (the canonical JSON Lines of CONTRACT.md) or {@code table} (a table
     * separated by blanks with a header line, {@code #} comments, the first column the iteration and every
     * other column a residual). Returns null for any other name.
     */
    public static FormatSpec builtIn(String name) {
        if ("jsonl".equals(name)) {
            Common c = Common.named("jsonl");
            return new Layout(c, "jsonl", () -> new JsonlParser(c));
        }
        if ("table".equals(name)) {
            TableSettings t = TableSettings.builtIn();
            return new Layout(t.common(), "table", () -> new TableParser(t));
        }
        return null;
    }

    /**
     * Reads a format file.
     *
     * @param fileName used in messages only
     * @param yamlText the file's text
     * @throws InputFileException naming the file, line, column and what was expected, for a YAML syntax
     *         error, a missing or unknown key, a {@code kind} other than {@code format}, a bad value or a
     *         regular expression that does not compile (the column then points at the error in it)
     */
    public static FormatSpec load(String fileName, String yamlText) throws InputFileException {
        String text = yamlText == null ? "" : yamlText;
        if (text.startsWith("\uFEFF")) {
            text = text.substring(1); // a byte order mark some editors write
        }
        return new Reader(fileName).read(text);
    }

    /** One file's reading; remembers the file name for messages. */
    private static final class Reader {
        private final String file;

        Reader(String file) {
            this.file = file;
        }

        private InputFileException error(Node at, String expected) {
            return new InputFileException(file, at.line(), at.column(), expected);
        }

        private InputFileException errorAtKey(MapNode map, String key, String expected) {
            int[] p = map.keyPositions().get(key);
            return new InputFileException(file, p[0], p[1], expected);
        }

        FormatSpec read(String text) throws InputFileException {
            Node root = YamlTree.read(file, text);
            if (!(root instanceof MapNode map)) {
                throw error(root, "a mapping of keys starting with \"kind: format\", found " + root.what());
            }
            Node kind = map.entries().get("kind");
            if (kind == null) {
                throw error(map, "a \"kind: format\" key (every file we read says what it holds)");
            }
            String k = text(kind, "kind");
            if (!"format".equals(k)) {
                throw error(kind, "\"kind: format\" in a format file, found \"kind: " + k + "\"");
            }
            Node layoutNode = map.entries().get("layout");
            if (layoutNode == null) {
                throw error(map, "a \"layout\" key: one of jsonl, table, lines");
            }
            String layout = text(layoutNode, "layout");
            List<String> allowed = new ArrayList<>(COMMON_KEYS);
            switch (layout) {
                case "jsonl":
                    break;
                case "table":
                    allowed.addAll(TABLE_KEYS);
                    break;
                case "lines":
                    allowed.addAll(LINES_KEYS);
                    break;
                default:
                    throw error(layoutNode, "layout one of jsonl, table, lines, found \"" + layout + "\"");
            }
            checkKeys(map, allowed, "a format with layout " + layout);
            Common common = common(map);
            switch (layout) {
                case "jsonl":
                    return new Layout(common, "jsonl", () -> new JsonlParser(common));
                case "table": {
                    TableSettings t = table(map, common);
                    return new Layout(common, "table", () -> new TableParser(t));
                }
                default: {
                    LineSettings l = lines(map, common);
                    return new Layout(common, "lines", () -> new RuleParser(l));
                }
            }
        }

        private void checkKeys(MapNode map, List<String> allowed, String what) throws InputFileException {
            for (String key : map.entries().keySet()) {
                if (!allowed.contains(key)) {
                    throw errorAtKey(map, key, "a key of " + what + " (" + String.join(", ", allowed)
                            + "), found unknown key \"" + key + "\"");
                }
            }
        }

        private Common common(MapNode map) throws InputFileException {
            String name = optText(map, "name");
            if (name == null) {
                String base = file.replace('\\', '/');
                base = base.substring(base.lastIndexOf('/') + 1);
                int dot = base.lastIndexOf('.');
                name = dot > 0 ? base.substring(0, dot) : base;
            }
            optText(map, "description");
            Repeated repeated = Repeated.LAST;
            String r = optText(map, "repeated");
            if (r != null) {
                repeated = Repeated.of(r);
                if (repeated == null) {
                    throw error(map.entries().get("repeated"), "repeated one of first, last, max, found \"" + r + "\"");
                }
            }
            int rank = LinePieces.NO_RANK;
            Node rankNode = map.entries().get("rank");
            if (rankNode != null) {
                String t = text(rankNode, "rank");
                try {
                    rank = Integer.parseInt(t);
                } catch (NumberFormatException e) {
                    rank = -1;
                }
                if (rank < 0) {
                    throw error(rankNode, "rank a whole number >= 0 (the MPI rank whose lines to read), found \"" + t
                            + "\"");
                }
            }
            Map<String, List<String>> families = new LinkedHashMap<>();
            Node fam = map.entries().get("families");
            if (fam != null) {
                if (!(fam instanceof MapNode fm)) {
                    throw error(fam, "families as a mapping of family name to a list of equation names, found "
                            + fam.what());
                }
                for (Map.Entry<String, Node> e : fm.entries().entrySet()) {
                    List<String> names = texts(e.getValue(), "families." + e.getKey());
                    if (names.isEmpty()) {
                        throw error(e.getValue(), "at least one equation name in family \"" + e.getKey() + "\"");
                    }
                    families.put(e.getKey(), List.copyOf(names));
                }
            }
            return new Common(name, repeated, rank, families);
        }

        private TableSettings table(MapNode map, Common common) throws InputFileException {
            char delimiter = 0;
            String d = optText(map, "delimiter");
            if (d != null) {
                switch (d) {
                    case "whitespace":
                        delimiter = 0;
                        break;
                    case "comma":
                        delimiter = ',';
                        break;
                    case "tab":
                        delimiter = '\t';
                        break;
                    case "semicolon":
                        delimiter = ';';
                        break;
                    default:
                        throw error(map.entries().get("delimiter"),
                                "delimiter one of whitespace, comma, tab, semicolon, found \"" + d + "\"");
                }
            }
            String comment = "#";
            if (map.entries().containsKey("comment")) {
                Node c = map.entries().get("comment");
                comment = c instanceof Scalar s && s.text() == null ? "" : text(c, "comment");
            }
            List<String> columns = map.entries().containsKey("columns") ? texts(map.entries().get("columns"),
                    "columns") : List.of();
            List<String> residuals = map.entries().containsKey("residuals")
                    ? texts(map.entries().get("residuals"), "residuals") : null;
            List<String> monitors = map.entries().containsKey("monitors")
                    ? texts(map.entries().get("monitors"), "monitors") : null;
            if (residuals != null && monitors != null) {
                for (String r : residuals) {
                    if (monitors.contains(r)) {
                        throw error(map.entries().get("monitors"), "a column in residuals or in monitors, not both; \""
                                + r + "\" is in both");
                    }
                }
            }
            TableSettings.Role unlisted = residuals == null ? TableSettings.Role.RESIDUAL
                    : monitors == null ? TableSettings.Role.MONITOR : TableSettings.Role.IGNORE;
            String u = optText(map, "unlisted");
            if (u != null) {
                switch (u) {
                    case "residual":
                        unlisted = TableSettings.Role.RESIDUAL;
                        break;
                    case "monitor":
                        unlisted = TableSettings.Role.MONITOR;
                        break;
                    case "ignore":
                        unlisted = TableSettings.Role.IGNORE;
                        break;
                    default:
                        throw error(map.entries().get("unlisted"), "unlisted one of residual, monitor, ignore, found \""
                                + u + "\"");
                }
            }
            boolean reprintSegment = true;
            String rh = optText(map, "reprinted-header");
            if (rh != null) {
                if (!rh.equals("new-segment") && !rh.equals("continue")) {
                    throw error(map.entries().get("reprinted-header"),
                            "reprinted-header one of new-segment, continue, found \"" + rh + "\"");
                }
                reprintSegment = rh.equals("new-segment");
            }
            String iteration = optText(map, "iteration");
            if (iteration != null && !columns.isEmpty() && !columns.contains(iteration)) {
                throw error(map.entries().get("iteration"), "the iteration column among columns " + columns
                        + ", found \"" + iteration + "\"");
            }
            return new TableSettings(common, delimiter, comment, columns, iteration, optText(map, "step"),
                    optText(map, "time"), optText(map, "inner"), residuals, monitors, unlisted, reprintSegment);
        }

        private LineSettings lines(MapNode map, Common common) throws InputFileException {
            Node rulesNode = map.entries().get("rules");
            if (rulesNode == null) {
                throw error(map, "a \"rules\" key: the list of line rules of a lines layout");
            }
            if (!(rulesNode instanceof ListNode list) || list.items().isEmpty()) {
                throw error(rulesNode, "rules as a non-empty list of {match, action, find}, found "
                        + rulesNode.what());
            }
            List<LineRule> rules = new ArrayList<>();
            boolean iteration = false;
            for (Node item : list.items()) {
                LineRule rule = rule(item);
                iteration |= rule.has("iteration");
                rules.add(rule);
            }
            boolean unmatchedMalformed = false;
            String u = optText(map, "unmatched");
            if (u != null) {
                if (!u.equals("ignore") && !u.equals("malformed")) {
                    throw error(map.entries().get("unmatched"), "unmatched one of ignore, malformed, found \"" + u
                            + "\"");
                }
                unmatchedMalformed = u.equals("malformed");
            }
            return new LineSettings(common, rules, unmatchedMalformed, !iteration);
        }

        private LineRule rule(Node item) throws InputFileException {
            if (!(item instanceof MapNode m)) {
                throw error(item, "a rule: a mapping with match, action and optionally find, found " + item.what());
            }
            checkKeys(m, RULE_KEYS, "a rule");
            Node matchNode = m.entries().get("match");
            if (matchNode == null) {
                throw error(m, "a \"match\" key: the rule's regular expression");
            }
            Node actionNode = m.entries().get("action");
            if (actionNode == null) {
                throw error(m, "an \"action\" key: one of " + LineRule.Action.ids());
            }
            String a = text(actionNode, "action");
            LineRule.Action action = LineRule.Action.of(a);
            if (action == null) {
                throw error(actionNode, "action one of " + LineRule.Action.ids() + ", found \"" + a + "\"");
            }
            Pattern match = regex(matchNode, "match");
            Set<String> groups = groups(matchNode, LineRule.GROUPS, false);
            List<Pattern> finds = new ArrayList<>();
            Node findNode = m.entries().get("find");
            if (findNode != null) {
                List<Node> items = findNode instanceof ListNode fl ? fl.items() : List.of(findNode);
                for (Node f : items) {
                    finds.add(regex(f, "find"));
                    groups(f, LineRule.FIND_GROUPS, true);
                }
            }
            return new LineRule(match, action, finds, groups);
        }

        private Pattern regex(Node node, String key) throws InputFileException {
            String r = text(node, key);
            try {
                return Pattern.compile(r);
            } catch (PatternSyntaxException e) {
                Scalar s = (Scalar) node;
                int index = Math.max(0, e.getIndex());
                int col = s.column() + (s.quoted() ? 1 : 0) + index;
                throw new InputFileException(file, s.line(), col, "a valid regular expression in " + key + ": "
                        + e.getDescription() + " at position " + index + " of the expression");
            }
        }

        private Set<String> groups(Node node, List<String> allowed, boolean needsPair) throws InputFileException {
            String r = ((Scalar) node).text();
            Set<String> groups = new LinkedHashSet<>(LineRule.namedGroups(r));
            for (String g : groups) {
                if (!allowed.contains(g)) {
                    throw error(node, "named groups among " + String.join(", ", allowed) + ", found \"(?<" + g
                            + ">\"");
                }
            }
            if (groups.contains("equation") != groups.contains("residual")) {
                throw error(node, "groups \"equation\" and \"residual\" together (a name and its value)");
            }
            if (groups.contains("monitor") != groups.contains("value")) {
                throw error(node, "groups \"monitor\" and \"value\" together (a name and its value)");
            }
            if (needsPair && !groups.contains("equation") && !groups.contains("monitor")) {
                throw error(node, "a find expression with groups equation + residual or monitor + value");
            }
            return groups;
        }

        private String optText(MapNode map, String key) throws InputFileException {
            Node n = map.entries().get(key);
            return n == null ? null : text(n, key);
        }

        private String text(Node n, String key) throws InputFileException {
            if (n instanceof Scalar s && s.text() != null && !s.text().isEmpty()) {
                return s.text();
            }
            throw error(n, "a text value for \"" + key + "\", found " + n.what());
        }

        private List<String> texts(Node n, String key) throws InputFileException {
            if (n instanceof Scalar) {
                return List.of(text(n, key));
            }
            if (!(n instanceof ListNode l)) {
                throw error(n, "a list of names for \"" + key + "\", found " + n.what());
            }
            List<String> out = new ArrayList<>();
            for (Node item : l.items()) {
                out.add(text(item, key));
            }
            return out;
        }
    }
}
