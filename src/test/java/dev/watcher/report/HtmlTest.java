package dev.watcher.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.ObjectMapper;
import org.junit.jupiter.api.Test;

/**
 * Escaping of text from the timeline. The replacements for HTML text and attribute values are those of the
 * OWASP Cross Site Scripting Prevention Cheat Sheet, rule #1 ({@code & < > " '}); the JSON escapes are
 * RFC 8259 section 7 ({@code \\uXXXX} for any character), checked by parsing back with Jackson.
 */
class HtmlTest {

    private static final ObjectMapper JSON = new ObjectMapper();

    @Test
    void escapesTheFiveMarkupCharacters() {
        assertEquals("&lt;img src=x onerror=&quot;alert(1)&quot;&gt; &amp; &#39;q&#39;",
                Html.text("<img src=x onerror=\"alert(1)\"> & 'q'"));
    }

    @Test
    void leavesPlainTextAndNonAsciiAlone() {
        String s = "x-momentum 3.2e-02 \u00b1 0.1 % \u2014 \u03c1 \u4e2d";
        assertEquals(s, Html.text(s));
    }

    @Test
    void dropsControlCharactersButKeepsLineBreaksAndTabs() {
        assertEquals("ab\tc\nd", Html.text("a\u0000b\tc\nd\u001b\u007f"));
        assertEquals("", Html.text(null));
    }

    @Test
    void alreadyEscapedTextIsEscapedAgainNotTrusted() {
        assertEquals("&amp;lt;b&amp;gt;", Html.text("&lt;b&gt;"));
    }

    @Test
    void jsonStringCannotCloseTheScriptElementAndParsesBack() throws Exception {
        String hostile = "</script><script>alert(1)</script><!-- \"q\" \\ \u2028\u2029 \n\t\u0001";
        String lit = Html.jsonString(hostile);
        assertFalse(lit.contains("<"), lit);
        assertFalse(lit.contains(">"), lit);
        assertFalse(lit.contains("\u2028"), lit);
        assertEquals(hostile, JSON.readValue(lit, String.class));
    }

    @Test
    void scriptSafeKeepsTheSameJsonValue() throws Exception {
        String json = JSON.writeValueAsString(java.util.Map.of("label", "</script><b>&amp;</b>\u2028"));
        String safe = Html.scriptSafe(json);
        assertFalse(safe.toLowerCase(java.util.Locale.ROOT).contains("</script"), safe);
        assertTrue(safe.contains("\\u003c/script\\u003e"), safe);
        assertEquals(JSON.readTree(json), JSON.readTree(safe));
    }
}
