package dev.watcher.cli;

import dev.watcher.report.ReportWriter;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.time.DateTimeException;
import java.time.ZoneId;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

@Command(name = "report", mixinStandardHelpOptions = true,
        description = {"Write the morning review: one self-contained HTML file (opens offline) with a verdict per"
                + " run, the residual and monitor history, forecasts, actions and the events.",
            "Give the state directory, or a timeline file (history/ and runs/ are looked for beside it; without"
                    + " them the report holds the events only)."})
final class ReportCommand implements Callable<Integer> {

    @Parameters(index = "0", paramLabel = "STATE_OR_TIMELINE", description = "A state directory or a timeline file.")
    Path input;

    @Option(names = {"-o", "--output"}, required = true, paramLabel = "FILE", description = "The HTML file to write.")
    Path output;

    @Option(names = "--zone", paramLabel = "ZONE",
            description = "Time zone the times are shown in, e.g. Europe/Berlin (default: this machine's zone)."
                    + " The timeline itself stays UTC.")
    String zone;

    @Override
    public Integer call() throws Exception {
        ZoneId z;
        try {
            z = zone == null ? ZoneId.systemDefault() : ZoneId.of(zone);
        } catch (DateTimeException e) {
            throw new Main.UserError("--zone " + zone + ": not a time zone (expected a region such as Europe/Berlin"
                    + " or an offset such as +01:00)");
        }
        if (!Files.exists(input)) {
            throw new Main.UserError(input + ": no such state directory or timeline file");
        }
        if (Files.isDirectory(output)) {
            throw new Main.UserError("-o " + output + ": is a directory; give the HTML file to write");
        }
        try {
            Path out = ReportWriter.write(input, output, z);
            System.out.println("report: " + out.toAbsolutePath());
            return 0;
        } catch (NoSuchFileException e) {
            throw new Main.UserError(input + ": " + (e.getReason() == null ? "not found" : e.getReason()), e);
        }
    }
}
