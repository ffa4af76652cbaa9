package dev.watcher.parse;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.InputFileException;
import org.junit.jupiter.api.Test;

/** Bad format files: every error names the file, the line and column, and what was expected. */
class FormatFileErrorsTest {

    private static InputFileException error(String yaml) {
        return assertThrows(InputFileException.class, () -> Formats.load("my-solver.yaml", yaml));
    }

    private static void assertAt(InputFileException e, int line, int column, String expectedPart) {
        assertEquals("my-solver.yaml", e.file(), e.getMessage());
        assertEquals(line, e.line(), e.getMessage());
        assertEquals(column, e.column(), e.getMessage());
        assertTrue(e.expected().contains(expectedPart), e.getMessage());
        assertTrue(e.getMessage().startsWith("my-solver.yaml:" + line + ":" + column + ": "), e.getMessage());
    }

    @Test
    void namesAnUnknownKeyWhereItStands() {
        InputFileException e = error("kind: format\nlayout: table\ndelimeter: comma\n");
        assertAt(e, 3, 1, "unknown key \"delimeter\"");
        assertTrue(e.expected().contains("delimiter"), "lists the keys it knows");
    }

    @Test
    void namesAnUnknownKeyInsideARule() {
        InputFileException e = error("kind: format\nlayout: lines\nrules:\n  - match: '^x'\n    action: ignore\n"
                + "    nmae: y\n");
        assertAt(e, 6, 5, "unknown key \"nmae\"");
    }

    @Test
    void pointsAtTheErrorInsideABadRegularExpression() {
        // '^~ pass (?<iteration>\d+' lacks its closing parenthesis: Java reports the position at its end.
        InputFileException e = error("kind: format\nlayout: lines\nrules:\n"
                + "  - match: '^~ pass (?<iteration>\\d+'\n    action: record\n");
        // The value starts at column 12 (a quote), the expression at 13; Java reports index 24 (the end).
        assertEquals(4, e.line(), e.getMessage());
        assertEquals(13 + 24, e.column(), e.getMessage());
        assertTrue(e.expected().contains("regular expression"), e.getMessage());
        assertTrue(e.expected().contains("Unclosed group"), e.getMessage());
    }

    @Test
    void pointsAtAnUnbalancedBracketInAnUnquotedExpression() {
        InputFileException e = error("kind: format\nlayout: lines\nrules:\n  - match: ^ab[c\n    action: ignore\n");
        assertEquals(4, e.line());
        assertTrue(e.column() >= 12 && e.column() <= 16, e.getMessage());
    }

    @Test
    void requiresKindFormat() {
        assertAt(error("layout: table\n"), 1, 1, "kind: format");
        assertAt(error("kind: rules\nlayout: table\n"), 1, 7, "found \"kind: rules\"");
    }

    @Test
    void requiresALayoutAndKnowsOnlyThree() {
        assertAt(error("kind: format\n"), 1, 1, "\"layout\"");
        assertAt(error("kind: format\nlayout: columns\n"), 2, 9, "jsonl, table, lines");
    }

    @Test
    void requiresMatchAndActionInEveryRule() {
        assertAt(error("kind: format\nlayout: lines\nrules:\n  - action: ignore\n"), 4, 5, "\"match\"");
        assertAt(error("kind: format\nlayout: lines\nrules:\n  - match: x\n"), 4, 5, "\"action\"");
        assertAt(error("kind: format\nlayout: lines\nrules:\n  - match: x\n    action: skip\n"), 5, 13,
                "record, open, values");
        assertAt(error("kind: format\nlayout: lines\n"), 1, 1, "\"rules\"");
    }

    @Test
    void rejectsUnknownNamedGroupsAndHalfPairs() {
        assertAt(error("kind: format\nlayout: lines\nrules:\n  - match: '(?<iter>\\d+)'\n    action: open\n"), 4, 12,
                "(?<iter>");
        assertAt(error("kind: format\nlayout: lines\nrules:\n  - match: '(?<equation>\\w+)'\n    action: values\n"),
                4, 12, "\"equation\" and \"residual\" together");
        assertAt(error("kind: format\nlayout: lines\nrules:\n  - match: x\n    action: record\n    find: 'y'\n"), 6,
                11, "equation + residual or monitor + value");
    }

    @Test
    void rejectsBadValuesWithWhatIsAllowed() {
        assertAt(error("kind: format\nlayout: table\ndelimiter: pipe\n"), 3, 12, "whitespace, comma, tab");
        assertAt(error("kind: format\nlayout: table\nrepeated: mean\n"), 3, 11, "first, last, max");
        assertAt(error("kind: format\nlayout: table\nunlisted: other\n"), 3, 11, "residual, monitor, ignore");
        assertAt(error("kind: format\nlayout: jsonl\nrank: -1\n"), 3, 7, "whole number");
        assertAt(error("kind: format\nlayout: table\nfamilies: [a, b]\n"), 3, 11, "mapping of family name");
        assertAt(error("kind: format\nlayout: table\nresiduals: [a]\nmonitors: [a]\n"), 4, 11, "not both");
    }

    @Test
    void reportsYamlSyntaxErrorsAndRepeatedKeysWithTheirPosition() {
        InputFileException syntax = error("kind: format\nlayout: [table\n");
        assertEquals("my-solver.yaml", syntax.file());
        assertTrue(syntax.line() >= 2, syntax.getMessage());
        assertTrue(syntax.expected().startsWith("valid YAML"), syntax.getMessage());
        assertAt(error("kind: format\nlayout: table\nlayout: jsonl\n"), 3, 1, "\"layout\" is repeated");
        assertAt(error(""), 1, 1, "empty file");
        assertAt(error("- a\n- b\n"), 1, 1, "mapping");
    }

    @Test
    void knowsTheBuiltInsByName() throws Exception {
        assertNotNull(Formats.builtIn("jsonl"));
        assertNotNull(Formats.builtIn("table"));
        assertNull(Formats.builtIn("csv"));
        assertEquals("table", Formats.builtIn("table").name());
        assertTrue(Formats.builtIn("table").families().isEmpty());
        assertEquals("my-solver", Formats.load("dir/my-solver.yaml", "kind: format\nlayout: jsonl\n").name());
    }
}
