package dev.watcher.cli;

import dev.watcher.model.InputFileException;
import dev.watcher.parse.FormatSample;
import dev.watcher.parse.FormatSpec;
import dev.watcher.parse.Formats;
import dev.watcher.rules.RulesLoader;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

@Command(name = "check", mixinStandardHelpOptions = true,
        description = {"Validate rules and format files. Errors name the file, line, column and what was expected.",
            "Exit 0 only when all are valid. With --sample, show what the first records of a log parse to."})
final class CheckCommand implements Callable<Integer> {

    private static final Pattern KIND = Pattern.compile("^kind:\\s*([A-Za-z-]+)\\s*(#.*)?$");

    @Parameters(arity = "1..*", paramLabel = "FILE", description = "Rules or format files (YAML starting with kind:).")
    List<Path> files;

    @Option(names = "--sample", paramLabel = "LOG", description = "A log to read with the format file given.")
    Path sample;

    @Option(names = "--records", paramLabel = "N", description = "How many records --sample shows (default 5).")
    int records = 5;

    @Override
    public Integer call() {
        int bad = 0;
        List<FormatSpec> formats = new ArrayList<>();
        for (Path f : files) {
            try {
                String text = Assembly.read(f, "input");
                String kind = kind(f, text);
                if (kind.equals("format")) {
                    formats.add(Formats.load(f.toString(), text));
                } else if (kind.equals("rules")) {
                    var rules = RulesLoader.load(f.toString(), text, RulesLoader.load("rules/default.yaml",
                            RulesLoader.defaultText(), null));
                    java.util.Map<String, String> all = new java.util.LinkedHashMap<>(rules.detectorOverrides());
                    for (var rr : rules.runs()) {
                        all.putAll(rr.tune());
                    }
                    List<String> problems = dev.watcher.daemon.Pipelines.parameterProblems(all);
                    if (!problems.isEmpty()) {
                        throw new Main.UserError(f + ": " + String.join("; ", problems));
                    }
                } else {
                    throw new InputFileException(f.toString(), line(text), 7, "kind: format or kind: rules, found '"
                            + kind + "'");
                }
                System.out.println(f + ": valid " + kind + " file");
            } catch (InputFileException e) {
                bad++;
                System.err.println(e.getMessage());
            } catch (Main.UserError e) {
                bad++;
                System.err.println(e.getMessage());
            }
        }
        if (sample != null) {
            if (formats.size() != 1) {
                System.err.println("--sample needs exactly one valid format file among the FILEs");
                return 2;
            }
            List<String> lines = new ArrayList<>();
            try (var r = Files.newBufferedReader(sample, StandardCharsets.UTF_8)) {
                String l;
                while ((l = r.readLine()) != null && lines.size() < 20000) {
                    lines.add(l);
                }
            } catch (IOException e) {
                System.err.println(sample + ": cannot read the sample log: " + e.getMessage());
                return 2;
            }
            System.out.print(FormatSample.describe(formats.get(0), lines, records));
        }
        return bad == 0 ? 0 : 2;
    }

    private static String kind(Path f, String text) throws InputFileException {
        String[] lines = text.split("\r?\n", -1);
        for (String l : lines) {
            String t = l.strip();
            if (t.isEmpty() || t.startsWith("#") || t.equals("---")) {
                continue;
            }
            Matcher m = KIND.matcher(t);
            if (m.matches()) {
                return m.group(1);
            }
            break;
        }
        throw new InputFileException(f.toString(), 1, 1, "a first key 'kind:' saying what the file holds"
                + " (format or rules)");
    }

    private static int line(String text) {
        String[] lines = text.split("\r?\n", -1);
        for (int i = 0; i < lines.length; i++) {
            if (lines[i].startsWith("kind:")) {
                return i + 1;
            }
        }
        return 1;
    }
}
