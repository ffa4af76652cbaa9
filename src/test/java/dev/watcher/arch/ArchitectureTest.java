package dev.watcher.arch;

import static com.tngtech.archunit.lang.syntax.ArchRuleDefinition.noClasses;
import static com.tngtech.archunit.library.dependencies.SlicesRuleDefinition.slices;

import com.tngtech.archunit.core.domain.JavaClasses;
import com.tngtech.archunit.core.importer.ClassFileImporter;
import com.tngtech.archunit.core.importer.ImportOption;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * Holds the pipeline's boundaries: stages are free of cycles, the pure core (model, parse, detect, rules)
 * does no file or network I/O and knows no Vert.x, and a stage depends on the model, not on its siblings.
 */
class ArchitectureTest {

    private static JavaClasses classes;

    @BeforeAll
    static void importClasses() {
        classes = new ClassFileImporter().withImportOption(ImportOption.Predefined.DO_NOT_INCLUDE_TESTS)
                .importPackages("dev.watcher");
    }

    @Test
    void stagesAreFreeOfCycles() {
        slices().matching("dev.watcher.(*)..").should().beFreeOfCycles().check(classes);
    }

    @Test
    void pureCoreDoesNoIoAndKnowsNoEventLoop() {
        noClasses().that().resideInAnyPackage("dev.watcher.model..", "dev.watcher.parse..", "dev.watcher.detect..",
                "dev.watcher.rules..")
                .should().dependOnClassesThat().resideInAnyPackage("io.vertx..", "java.nio.file..", "java.net..",
                        "java.nio.channels..")
                .orShould().dependOnClassesThat().haveFullyQualifiedName("java.io.File")
                .orShould().dependOnClassesThat().haveFullyQualifiedName("java.io.FileInputStream")
                .orShould().dependOnClassesThat().haveFullyQualifiedName("java.io.FileOutputStream")
                .check(classes);
    }

    @Test
    void coreStagesDependOnModelNotOnSiblings() {
        String[] stages = {"tail", "parse", "detect", "rules", "notify", "act", "journal", "history", "report",
            "live"};
        for (String s : stages) {
            String[] others = java.util.Arrays.stream(stages).filter(o -> !o.equals(s))
                    .map(o -> "dev.watcher." + o + "..").toArray(String[]::new);
            noClasses().that().resideInAPackage("dev.watcher." + s + "..")
                    .should().dependOnClassesThat().resideInAnyPackage(others)
                    .allowEmptyShould(true)
                    .check(classes);
        }
    }
}
