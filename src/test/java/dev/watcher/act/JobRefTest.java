package dev.watcher.act;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/** Job specs as CONTRACT.md gives them: pid:N | slurm:ID[_TASK][.STEP] | pbs:ID. */
class JobRefTest {

    @Test
    void parsesALocalPid() {
        assertEquals(new JobRef.Pid(4242), JobRef.parse("pid:4242"));
        assertEquals("pid:4242", JobRef.parse("pid:4242").describe());
    }

    @Test
    void parsesEverySlurmForm() {
        JobRef.Slurm plain = (JobRef.Slurm) JobRef.parse("slurm:1234");
        assertEquals("1234", plain.target());
        assertNull(plain.step());
        JobRef.Slurm task = (JobRef.Slurm) JobRef.parse("slurm:1234_7");
        assertEquals("7", task.arrayTask());
        assertEquals("1234_7", task.target());
        JobRef.Slurm step = (JobRef.Slurm) JobRef.parse("slurm:1234.3");
        assertEquals("1234", step.job());
        assertEquals("1234.3", step.target());
        JobRef.Slurm both = (JobRef.Slurm) JobRef.parse("slurm:1234_7.0");
        assertEquals("1234_7", both.job());
        assertEquals("slurm:1234_7.0", both.describe());
    }

    @Test
    void parsesPbsIdsWithServerAndArrayIndex() {
        assertEquals("pbs:77.head-node", JobRef.parse("pbs:77.head-node").describe());
        assertEquals("12[3].srv", ((JobRef.Pbs) JobRef.parse("pbs:12[3].srv")).id());
    }

    @Test
    void rejectsMalformedSpecsNamingWhatWasExpected() {
        for (String bad : new String[] {"", "1234", "pid:", "pid:-3", "pid:abc", "slurm:12x", "slurm:_3",
            "slurm:1.2.3", "pbs:server", "lsf:12"}) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> JobRef.parse(bad), bad);
            assertTrue(e.getMessage().contains("expected pid:N"), e.getMessage());
        }
    }
}
