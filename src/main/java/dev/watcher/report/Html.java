package dev.watcher.report;

/**
 * Escaping for the two places text from the timeline lands in the page: HTML text and attribute values
 * ({@link #text}), and JSON data inside a {@code <script type="application/json">} element ({@link #jsonString},
 * {@link #scriptSafe}). Pure functions; thread-safe.
 */
final class Html {

    private Html() {
    }

    /**
     * Escapes {@code s} for HTML text and double- or single-quoted attribute values: {@code & < > " '} become
     * character references; control characters other than tab, newline and carriage return are dropped
     * (they cannot appear in an HTML document). Null gives the empty string.
     */
    static String text(String s) {
        if (s == null) {
            return "";
        }
        StringBuilder b = null;
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            String r = switch (c) {
                case '&' -> "&amp;";
                case '<' -> "&lt;";
                case '>' -> "&gt;";
                case '"' -> "&quot;";
                case '\'' -> "&#39;";
                default -> (c < 0x20 && c != '\t' && c != '\n' && c != '\r') || c == 0x7f ? "" : null;
            };
            if (r != null) {
                if (b == null) {
                    b = new StringBuilder(s.length() + 16).append(s, 0, i);
                }
                b.append(r);
            } else if (b != null) {
                b.append(c);
            }
        }
        return b == null ? s : b.toString();
    }

    /**
     * A JSON string literal (with its quotes) for {@code s} that is also safe inside a script element:
     * besides JSON's own escapes, {@code < > &} and the line separators U+2028/U+2029 are written as
     * {@code \\uXXXX}, so no {@code </script>} or {@code <!--} can appear in the output.
     */
    static String jsonString(String s) {
        if (s == null) {
            return "null";
        }
        StringBuilder b = new StringBuilder(s.length() + 2).append('"');
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            switch (c) {
                case '"' -> b.append("\\\"");
                case '\\' -> b.append("\\\\");
                case '\n' -> b.append("\\n");
                case '\r' -> b.append("\\r");
                case '\t' -> b.append("\\t");
                default -> {
                    if (c < 0x20 || c == '<' || c == '>' || c == '&' || c == 0x2028 || c == 0x2029) {
                        b.append(String.format("\\u%04x", (int) c));
                    } else {
                        b.append(c);
                    }
                }
            }
        }
        return b.append('"').toString();
    }

    /** Makes already-serialized JSON safe inside a script element (see {@link #jsonString}). */
    static String scriptSafe(String json) {
        return json.replace("<", "\\u003c").replace(">", "\\u003e").replace("&", "\\u0026")
                .replace("\u2028", "\\u2028").replace("\u2029", "\\u2029");
    }
}
