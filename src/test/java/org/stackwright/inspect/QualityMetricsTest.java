package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.HashMap;
import java.util.Map;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.api.Test;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * NRMSE, PSNR, SSIM and Pearson correlation against scikit-image 0.19.3 / scipy 1.10.1 on committed invented image
 * pairs (src/test/resources/reference/, made by tools/reference/metrics_reference.py): within 1e-4.
 * SSIM: Wang, Bovik, Sheikh & Simoncelli, IEEE TIP 13(4):600-612, 2004, Gaussian window sigma 1.5, K1 0.01,
 * K2 0.03, explicit data range.
 */
class QualityMetricsTest {

    static final Path DIR = Paths.get(System.getProperty("stackwright.project.dir", "."), "src", "test", "resources",
            "reference");

    static Map<String, Double> reference() throws IOException {
        Map<String, Double> m = new HashMap<>();
        for (String line : Files.readAllLines(DIR.resolve("metrics-reference.txt"))) {
            if (line.startsWith("#") || line.isBlank()) {
                continue;
            }
            String[] p = line.trim().split("\\s+");
            m.put(p[0] + " " + p[1], Double.parseDouble(p[2]));
        }
        return m;
    }

    @ParameterizedTest
    @CsvSource({"metrics-2d, false", "metrics-3d, true", "metrics-thin, false"})
    void equalsScikitImage(String name, boolean explicitRange) throws IOException {
        Map<String, Double> ref = reference();
        Volume a = TiffFiles.read(DIR.resolve(name + "-reference.tif"), "reference");
        Volume b = TiffFiles.read(DIR.resolve(name + "-input.tif"), "input");
        double range = explicitRange ? ref.get(name + " data_range") : Double.NaN;
        QualityMetrics q = QualityMetrics.of(a, b, range);
        assertEquals(ref.get(name + " data_range"), q.dataRange(), 1e-4);
        assertEquals(ref.get(name + " ssim"), q.ssim(), 1e-4, "SSIM");
        assertEquals(ref.get(name + " psnr"), q.psnr(), 1e-4, "PSNR");
        assertEquals(ref.get(name + " nrmse"), q.nrmse(), 1e-4, "NRMSE");
        assertEquals(ref.get(name + " nrmse_minmax"), q.nrmseMinMax(), 1e-4, "NRMSE min-max");
        assertEquals(ref.get(name + " nrmse_mean"), q.nrmseMean(), 1e-4, "NRMSE mean");
        assertEquals(ref.get(name + " pearson"), q.pearson(), 1e-4, "Pearson");
    }

    @Test
    void identicalImagesGiveSsimOneAndPearsonOne() {
        Volume a = TiffFiles.read(DIR.resolve("metrics-2d-reference.tif"), "reference");
        QualityMetrics q = QualityMetrics.of(a, a.copy(), 100);
        // SSIM(x, x) = 1 by eq. 13 of Wang et al. 2004; correlation of a variable with itself is 1
        assertEquals(1, q.ssim(), 1e-12);
        assertEquals(1, q.pearson(), 1e-12);
        assertEquals(0, q.nrmse(), 0);
        assertTrue(Double.isInfinite(q.psnr()));
    }

    @Test
    void badInputNamesTheSetting() {
        Volume a = Volume.zeros(12, 12, 1, VoxelSize.UNIT);
        Volume b = Volume.zeros(13, 12, 1, VoxelSize.UNIT);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> QualityMetrics.of(a, b, 1));
        assertTrue(e.getMessage().contains("reference"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> QualityMetrics.of(a, a.copy(), Double.NaN));
        assertTrue(e.getMessage().contains("data-range"), e.getMessage());
    }
}
