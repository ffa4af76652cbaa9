package dev.watcher.rules;

import com.fasterxml.jackson.core.JsonLocation;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import dev.watcher.model.InputFileException;
import java.io.IOException;
import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * A YAML value with the line and column (1-based) where it starts, so every complaint about a rules file can
 * point at the spot. Built from Jackson's streaming YAML parser and its token locations; the tree is small
 * (a rules file, not a log), so it is read whole.
 */
final class YamlNode {

    enum Kind { MAP, LIST, SCALAR, NULL }

    final Kind kind;
    final int line;
    final int column;
    /** For scalars: the text as written (numbers and booleans too). */
    final String text;
    /** For maps: entries in file order; keys carry their own location in {@link #keyNodes}. */
    final Map<String, YamlNode> entries;
    final Map<String, YamlNode> keyNodes;
    final List<YamlNode> items;

    private YamlNode(Kind kind, int line, int column, String text, Map<String, YamlNode> entries,
            Map<String, YamlNode> keyNodes, List<YamlNode> items) {
        this.kind = kind;
        this.line = line;
        this.column = column;
        this.text = text;
        this.entries = entries;
        this.keyNodes = keyNodes;
        this.items = items;
    }

    static YamlNode scalar(String text, int line, int column) {
        return new YamlNode(Kind.SCALAR, line, column, text, Map.of(), Map.of(), List.of());
    }

    /** Parses one YAML document; an empty document is an empty map at 1:1. */
    static YamlNode parse(String fileName, String text) throws InputFileException {
        YAMLFactory factory = new YAMLFactory();
        try (JsonParser p = factory.createParser(text)) {
            JsonToken t = p.nextToken();
            if (t == null) {
                return new YamlNode(Kind.MAP, 1, 1, null, Map.of(), Map.of(), List.of());
            }
            YamlNode root = read(fileName, p);
            return root;
        } catch (JsonProcessingException e) {
            JsonLocation loc = e.getLocation();
            int line = loc == null ? 1 : Math.max(1, loc.getLineNr());
            int col = loc == null ? 1 : Math.max(1, loc.getColumnNr());
            throw new InputFileException(fileName, line, col, "well-formed YAML (" + e.getOriginalMessage() + ")");
        } catch (IOException e) {
            // reading from a String: only a syntax problem can get here
            throw new InputFileException(fileName, 1, 1, "readable YAML text (" + e.getMessage() + ")");
        }
    }

    private static YamlNode read(String fileName, JsonParser p) throws IOException, InputFileException {
        JsonLocation loc = p.currentTokenLocation();
        int line = Math.max(1, loc.getLineNr());
        int col = Math.max(1, loc.getColumnNr());
        JsonToken t = p.currentToken();
        switch (t) {
            case START_OBJECT: {
                Map<String, YamlNode> entries = new LinkedHashMap<>();
                Map<String, YamlNode> keys = new LinkedHashMap<>();
                while (p.nextToken() == JsonToken.FIELD_NAME) {
                    JsonLocation kl = p.currentTokenLocation();
                    String key = p.currentName();
                    YamlNode keyNode = scalar(key, Math.max(1, kl.getLineNr()), Math.max(1, kl.getColumnNr()));
                    if (entries.containsKey(key)) {
                        throw new InputFileException(fileName, keyNode.line, keyNode.column,
                                "each key once in a mapping, but `" + key + "` appears again");
                    }
                    p.nextToken();
                    entries.put(key, read(fileName, p));
                    keys.put(key, keyNode);
                }
                return new YamlNode(Kind.MAP, line, col, null, Collections.unmodifiableMap(entries),
                        Collections.unmodifiableMap(keys), List.of());
            }
            case START_ARRAY: {
                List<YamlNode> items = new ArrayList<>();
                while (p.nextToken() != JsonToken.END_ARRAY) {
                    items.add(read(fileName, p));
                }
                return new YamlNode(Kind.LIST, line, col, null, Map.of(), Map.of(), List.copyOf(items));
            }
            case VALUE_NULL:
                return new YamlNode(Kind.NULL, line, col, null, Map.of(), Map.of(), List.of());
            default:
                return scalar(p.getText(), line, col);
        }
    }

    boolean isMap() {
        return kind == Kind.MAP;
    }

    boolean isList() {
        return kind == Kind.LIST;
    }

    boolean isScalar() {
        return kind == Kind.SCALAR;
    }

    boolean isNull() {
        return kind == Kind.NULL;
    }

    String describe() {
        switch (kind) {
            case MAP:
                return "a mapping";
            case LIST:
                return "a list";
            case NULL:
                return "nothing";
            default:
                return "`" + text + "`";
        }
    }
}
