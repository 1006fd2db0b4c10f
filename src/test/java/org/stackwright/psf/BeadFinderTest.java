package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.junit.jupiter.api.Test;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** Bead screening on a small invented stack: an isolated bead is kept, a bead at the edge is refused. */
class BeadFinderTest {

    @Test
    void edgeBeadIsRejectedWithItsReason() {
        Volume v = Volume.zeros(60, 50, 21, VoxelSize.UNIT);
        double[][] beads = {{30, 25, 10}, {4, 25, 10}};
        for (int z = 0; z < v.depth(); z++) {
            for (int y = 0; y < v.height(); y++) {
                for (int x = 0; x < v.width(); x++) {
                    double s = 10;
                    for (double[] b : beads) {
                        s += 1000 * Math.exp(-0.5 * ((x - b[0]) * (x - b[0]) + (y - b[1]) * (y - b[1])) / 2.0
                                - 0.5 * (z - b[2]) * (z - b[2]) / 6.0);
                    }
                    v.set(x, y, z, (float) s);
                }
            }
        }
        List<Bead> found = BeadFinder.find(v, 5, 5, 3, Double.NaN);
        assertEquals(2, found.size(), found.toString());
        Bead inner = found.stream().filter(b -> b.x() == 30).findFirst().orElseThrow();
        Bead edge = found.stream().filter(b -> b.x() == 4).findFirst().orElseThrow();
        assertTrue(inner.used(), inner.toString());
        assertFalse(edge.used());
        assertTrue(edge.reason().startsWith("too close to the image edge for a 11x11x7 box"), edge.reason());
    }
}
