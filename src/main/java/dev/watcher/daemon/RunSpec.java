package dev.watcher.daemon;

import dev.watcher.parse.FormatSpec;
import java.nio.file.Path;
import java.util.List;

/**
 * One run to watch: its name and the files that feed it (usually one log; several when residuals and
 * monitors are written to separate files, joined on the iteration), each with the format that reads it.
 */
public record RunSpec(String name, List<Path> sources, List<FormatSpec> formats) {

    public RunSpec {
        sources = List.copyOf(sources);
        formats = List.copyOf(formats);
        if (sources.isEmpty() || sources.size() != formats.size()) {
            throw new IllegalArgumentException("a run needs one format per source file");
        }
    }
}
