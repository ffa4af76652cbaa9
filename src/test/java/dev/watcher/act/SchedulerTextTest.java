package dev.watcher.act;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import org.junit.jupiter.api.Test;

/** Reading what scontrol and qstat print, and the core-hours arithmetic. */
class SchedulerTextTest {

    @Test
    void readsEverySlurmTimeFormat() {
        // sbatch(1), --time: "minutes", "minutes:seconds", "hours:minutes:seconds", "days-hours",
        // "days-hours:minutes" and "days-hours:minutes:seconds".
        assertEquals(Duration.ofMinutes(90), SlurmControl.parseTimeLimit("90"));
        assertEquals(Duration.ofMinutes(5).plusSeconds(30), SlurmControl.parseTimeLimit("5:30"));
        assertEquals(Duration.ofHours(12).plusMinutes(15), SlurmControl.parseTimeLimit("12:15:00"));
        assertEquals(Duration.ofDays(2).plusHours(3), SlurmControl.parseTimeLimit("2-03"));
        assertEquals(Duration.ofDays(1).plusHours(2).plusMinutes(30), SlurmControl.parseTimeLimit("1-02:30"));
        assertEquals(Duration.ofDays(1).plusSeconds(5), SlurmControl.parseTimeLimit("1-00:00:05"));
        assertNull(SlurmControl.parseTimeLimit("UNLIMITED"));
        assertNull(SlurmControl.parseTimeLimit("Partition_Limit"));
    }

    @Test
    void readsStartLimitAndCpusFromScontrolShowJob() {
        // A line as scontrol show job -o printed it on the project's one-node test cluster (shortened).
        String line = "JobId=1 JobName=t.sbatch UserId=root(0) JobState=RUNNING Reason=None RunTime=00:00:03 "
                + "TimeLimit=00:10:00 TimeMin=N/A SubmitTime=2026-12-02T04:15:25 StartTime=2026-12-02T04:15:25 "
                + "EndTime=2026-12-02T04:25:25 NodeList=vm NumNodes=1 NumCPUs=1 NumTasks=1 CPUs/Task=1";
        JobInfo info = SlurmControl.parseShowJob(line, ZoneOffset.UTC);
        assertEquals(Instant.parse("2026-12-02T04:15:25Z"), info.start());
        assertEquals(Duration.ofMinutes(10), info.timeLimit());
        assertEquals(1, info.cores());
    }

    @Test
    void pendingSlurmJobHasNoStart() {
        JobInfo info = SlurmControl.parseShowJob("JobId=9 StartTime=Unknown TimeLimit=UNLIMITED NumCPUs=4",
                ZoneOffset.UTC);
        assertNull(info.start());
        assertNull(info.timeLimit());
        assertEquals(4, info.cores());
        assertTrue(info.coreHoursLeft(Instant.EPOCH).isEmpty());
    }

    @Test
    void readsWalltimeNodesAndStartFromQstat() {
        // Attribute spellings of qstat -f output (Torque) [memory].
        String text = "Job Id: 77.head\n    job_state = R\n    Resource_List.nodes = 2:ppn=16\n"
                + "    Resource_List.walltime = 24:00:00\n    start_time = Wed Dec  2 04:00:00 2026\n";
        JobInfo info = PbsControl.parseQstat(text, ZoneOffset.UTC);
        assertEquals(32, info.cores());
        assertEquals(Duration.ofHours(24), info.timeLimit());
        assertEquals(Instant.parse("2026-12-02T04:00:00Z"), info.start());
    }

    @Test
    void coreHoursLeftAreCoresTimesTimeLeftBeforeTheLimit() {
        // 64 cores, 24 h limit, 6 h in: 18 h x 64 = 1152 core-hours (plain arithmetic).
        JobInfo info = new JobInfo(Instant.parse("2026-12-01T00:00:00Z"), Duration.ofHours(24), 64, "given");
        assertEquals(1152.0, info.coreHoursLeft(Instant.parse("2026-12-01T06:00:00Z")).orElseThrow(), 1e-9);
        assertEquals(0.0, info.coreHoursLeft(Instant.parse("2026-12-03T00:00:00Z")).orElseThrow(), 1e-9);
    }

    @Test
    void givenValuesFillWhatTheSchedulerDoesNotTell() {
        JobInfo merged = new JobInfo(Instant.EPOCH, null, null, "process")
                .orElse(new JobInfo(null, Duration.ofHours(2), 8, "given"));
        assertEquals(Duration.ofHours(2), merged.timeLimit());
        assertEquals(8, merged.cores());
        assertEquals(Instant.EPOCH, merged.start());
        assertEquals("process+given", merged.source());
    }
}
