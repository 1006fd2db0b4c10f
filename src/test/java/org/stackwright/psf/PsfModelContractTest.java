package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.stream.Stream;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * One suite run over every PSF model (design rule of the project: a PSF has odd sizes, its peak on the centre
 * voxel and unit sum; a rotationally symmetric PSF sampled on square pixels has equal x and y profiles), on
 * matched and index-mismatched optics and on non-square grids, plus the refusal of impossible optics.
 */
class PsfModelContractTest extends TwoWorkers {


    static Stream<Arguments> cases() {
        VoxelSize voxel = new VoxelSize(0.065, 0.065, 0.15);
        PsfSettings matched = PsfSettings.matched(1.2, 520, 1.33, voxel, 33, 33, 21).withExcitation(488, 1);
        PsfSettings mismatched = PsfSettings.matched(1.3, 600, 1.518, voxel, 31, 31, 25).withSample(1.33, 8)
                .withExcitation(900, 0.5);
        PsfSettings oblong = PsfSettings.matched(0.8, 520, 1.0, new VoxelSize(0.1, 0.1, 0.3), 27, 19, 9)
                .withExcitation(850, 2);
        return PsfModel.all().stream().flatMap(m -> Stream.of(
                Arguments.of(m.name(), matched), Arguments.of(m.name(), mismatched), Arguments.of(m.name(), oblong)));
    }

    @ParameterizedTest(name = "{0} {1}")
    @MethodSource("cases")
    void calibratedCentredUnitSumSymmetric(String model, PsfSettings s) {
        Volume v = PsfModel.byName(model).compute(s, workers);
        assertEquals(s.nx(), v.width());
        assertEquals(s.ny(), v.height());
        assertEquals(s.nz(), v.depth());
        assertTrue(v.voxel().sameAs(s.voxel()), "voxel size " + v.voxel());
        assertEquals(0, v.countNonFinite());
        for (float f : v.data()) {
            assertTrue(f >= 0, "negative voxel " + f);
        }
        assertEquals(1.0, v.sum(), 1e-5, "sum");
        int c = v.index(s.nx() / 2, s.ny() / 2, s.nz() / 2);
        assertEquals(v.max(), v.data()[c], 0f, "the centre voxel holds the maximum");
        // x and y profiles through the centre agree (relative to the peak) within 1e-4
        int h = Math.min(s.nx(), s.ny()) / 2;
        for (int z = 0; z < s.nz(); z++) {
            for (int d = -h; d <= h; d++) {
                float px = v.get(s.nx() / 2 + d, s.ny() / 2, z);
                float py = v.get(s.nx() / 2, s.ny() / 2 + d, z);
                assertEquals(px, py, 1e-4 * v.max(), "x/y profile at offset " + d + ", plane " + z);
            }
        }
    }

    @ParameterizedTest(name = "{0} {1}")
    @MethodSource("cases")
    void repeatRunsAndThreadCountsGiveIdenticalVoxels(String model, PsfSettings s) {
        Volume a = PsfModel.byName(model).compute(s, workers);
        try (Workers one = new Workers(1)) {
            Volume b = PsfModel.byName(model).compute(s, one);
            assertEquals(a, b);
        }
    }

    static Stream<Arguments> impossible() {
        VoxelSize voxel = new VoxelSize(0.1, 0.1, 0.2);
        PsfSettings ok = PsfSettings.matched(1.4, 520, 1.518, voxel, 33, 33, 21).withExcitation(900, 1);
        return PsfModel.all().stream().flatMap(m -> Stream.of(
                Arguments.of(m.name(), PsfSettings.matched(1.6, 520, 1.518, voxel, 33, 33, 21),
                        "na = 1.6 must be smaller than immersion-index = 1.518"),
                Arguments.of(m.name(), ok.withGrid(voxel, 32, 33, 21), "size = 32x33x21"),
                Arguments.of(m.name(), ok.withSample(1.33, -2), "depth = -2"),
                Arguments.of(m.name(), ok.withSample(0.5, 0), "sample-index = 0.5"),
                Arguments.of(m.name(), ok.withExcitation(-400, 1), "excitation = -400"),
                Arguments.of(m.name(), ok.withExcitation(0, -1), "pinhole = -1")));
    }

    @ParameterizedTest(name = "{0}: {2}")
    @MethodSource("impossible")
    void refusesImpossibleOpticsNamingTheKey(String model, PsfSettings s, String message) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> PsfModel.byName(model).compute(s, workers));
        assertTrue(e.getMessage().contains(message), e.getMessage());
    }
}
