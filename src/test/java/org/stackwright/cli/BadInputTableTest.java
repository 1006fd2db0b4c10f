package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeFalse;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.attribute.PosixFilePermissions;
import java.util.List;
import java.util.stream.Stream;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * Runs every row of {@link BadInputTable}: the exit code must match and the message must contain the fragment
 * (which names the parameter, the value and what is allowed). Afterwards no input file may have changed and no
 * temporary output file may be left.
 */
class BadInputTableTest {

    static Stream<BadInputTable.Case> rows() {
        return BadInputTable.rows().stream();
    }

    @BeforeAll
    static void permissions() throws IOException {
        Fixtures x = BadInputTable.FILES;
        Files.createDirectories(x.path("read-only"));
        Files.setPosixFilePermissions(x.path("read-only"), PosixFilePermissions.fromString("r-xr-xr-x"));
        Files.writeString(x.path("locked.tif"), "II*\0");
        Files.setPosixFilePermissions(x.path("locked.tif"), PosixFilePermissions.fromString("---------"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("rows")
    void badInput(BadInputTable.Case c) {
        assumeFalse(Fixtures.isRoot() && (c.name().contains("read-only") || c.name().contains("unreadable")),
                "root ignores file permissions; this row runs only as an ordinary user");
        BadInputTable.Outcome o = c.action().get();
        assertEquals(c.exit(), o.exit(), c.name() + ": exit code; messages:\n" + o.messages());
        assertTrue(o.messages().contains(c.fragment()), c.name() + ": message should contain\n  " + c.fragment()
                + "\nbut was\n  " + o.messages());
        assertTrue(!o.messages().contains("Exception") || c.exit() == 0 && !o.messages().contains("\tat "),
                c.name() + ": a stack trace or exception name reached the user: " + o.messages());
    }

    @Test
    void tableHasEnoughRows() {
        List<BadInputTable.Case> t = BadInputTable.rows();
        assertTrue(t.size() >= 40, "rows: " + t.size());
        assertEquals(t.size(), t.stream().map(BadInputTable.Case::name).distinct().count(), "row names must be distinct");
    }

    @AfterAll
    static void nothingChangedNothingLeft() {
        try (Fixtures x = BadInputTable.FILES) {
            assertTrue(x.changedInputs().isEmpty(), "inputs modified: " + x.changedInputs());
            assertTrue(Fixtures.temporaryFiles(x.dir).isEmpty(), "temporary files left: " + Fixtures.temporaryFiles(x.dir));
        }
    }
}
