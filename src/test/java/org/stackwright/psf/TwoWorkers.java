package org.stackwright.psf;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.stackwright.parallel.Workers;

/** Base of the PSF test classes: two worker threads for the whole class. */
abstract class TwoWorkers {

    static Workers workers;

    @BeforeAll
    static void startWorkers() {
        workers = new Workers(2);
    }

    @AfterAll
    static void stopWorkers() {
        workers.close();
    }
}
