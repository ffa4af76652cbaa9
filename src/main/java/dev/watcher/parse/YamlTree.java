package dev.watcher.parse;

import com.fasterxml.jackson.core.JsonLocation;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import dev.watcher.model.InputFileException;
import java.io.IOException;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * A YAML document read into plain nodes that remember where they stand (line and column, 1-based, from
 * Jackson's {@link JsonLocation}), so that checks made after reading can still point at the right place.
 */
final class YamlTree {

    private static final YAMLFactory YAML = new YAMLFactory();

    private YamlTree() {
    }

    /** Any node. */
    sealed interface Node permits MapNode, ListNode, Scalar {
        int line();

        int column();

        /** What the node is, for messages ("a mapping", "a list", "a text"). */
        String what();
    }

    /** A mapping; keys in file order, each with its own position. */
    record MapNode(Map<String, Node> entries, Map<String, int[]> keyPositions, int line, int column)
            implements Node {
        public String what() {
            return "a mapping";
        }
    }

    /** A sequence. */
    record ListNode(List<Node> items, int line, int column) implements Node {
        public String what() {
            return "a list";
        }
    }

    /**
     * A scalar; {@code text} is null for an empty value. {@code quoted} tells whether the text started with a
     * quote in the file (so that a position inside the text can be turned into a column).
     */
    record Scalar(String text, boolean quoted, int line, int column) implements Node {
        public String what() {
            return text == null ? "nothing" : "\"" + text + "\"";
        }
    }

    /** Reads {@code text}; syntax errors and repeated keys become {@link InputFileException}s. */
    static Node read(String file, String text) throws InputFileException {
        String[] lines = text.split("\n", -1);
        try (JsonParser p = YAML.createParser(text)) {
            JsonToken t = p.nextToken();
            if (t == null) {
                throw new InputFileException(file, 1, 1, "a YAML mapping starting with \"kind: format\", found an "
                        + "empty file");
            }
            Node root = node(file, p, t, lines);
            if (p.nextToken() != null) {
                JsonLocation l = p.currentTokenLocation();
                throw new InputFileException(file, l.getLineNr(), l.getColumnNr(), "one YAML document only");
            }
            return root;
        } catch (JsonProcessingException e) {
            JsonLocation l = e.getLocation();
            throw new InputFileException(file, l == null ? 1 : Math.max(1, l.getLineNr()),
                    l == null ? 1 : Math.max(1, l.getColumnNr()), "valid YAML (" + yamlProblem(e) + ")");
        } catch (IOException e) {
            throw new InputFileException(file, 1, 1, "readable YAML (" + e.getMessage() + ")");
        }
    }

    /** SnakeYAML's message without its excerpt lines: "while parsing X ... expected Y, but found Z". */
    private static String yamlProblem(JsonProcessingException e) {
        String msg = String.valueOf(e.getOriginalMessage());
        StringBuilder b = new StringBuilder();
        for (String line : msg.split("\n")) {
            String t = line.strip();
            if (t.isEmpty() || t.startsWith("in '") || t.startsWith("^") || line.startsWith("    ")) {
                continue; // position lines and the quoted excerpt: the position is given separately
            }
            b.append(b.length() == 0 ? "" : "; ").append(t);
        }
        String out = b.toString();
        return out.length() > 200 ? out.substring(0, 200) + "..." : out;
    }

    private static Node node(String file, JsonParser p, JsonToken t, String[] lines)
            throws IOException, InputFileException {
        JsonLocation at = p.currentTokenLocation();
        int line = at.getLineNr();
        int col = at.getColumnNr();
        switch (t) {
            case START_OBJECT: {
                Map<String, Node> entries = new LinkedHashMap<>();
                Map<String, int[]> keys = new LinkedHashMap<>();
                JsonToken k;
                while ((k = p.nextToken()) == JsonToken.FIELD_NAME) {
                    String key = p.currentName();
                    JsonLocation kl = p.currentTokenLocation();
                    if (entries.containsKey(key)) {
                        throw new InputFileException(file, kl.getLineNr(), kl.getColumnNr(),
                                "each key once; \"" + key + "\" is repeated");
                    }
                    Node value = node(file, p, p.nextToken(), lines);
                    entries.put(key, value);
                    keys.put(key, new int[] {kl.getLineNr(), kl.getColumnNr()});
                }
                return new MapNode(entries, keys, line, col);
            }
            case START_ARRAY: {
                List<Node> items = new ArrayList<>();
                JsonToken i;
                while ((i = p.nextToken()) != JsonToken.END_ARRAY) {
                    items.add(node(file, p, i, lines));
                }
                return new ListNode(items, line, col);
            }
            case VALUE_NULL:
                return new Scalar(null, false, line, col);
            default: {
                boolean quoted = false;
                if (line >= 1 && line <= lines.length && col >= 1 && col <= lines[line - 1].length()) {
                    char c = lines[line - 1].charAt(col - 1);
                    quoted = c == '\'' || c == '"';
                }
                return new Scalar(p.getText(), quoted, line, col);
            }
        }
    }
}
