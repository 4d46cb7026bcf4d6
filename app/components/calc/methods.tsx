/** The "How it is worked out" text of each calculator page, with the sources of its formulas. */
import { OIL_CLEARANCE_RULE, RING_GAP_BAND_FACTOR, TWO_POINT_GAUGE_NOTE } from "~/lib/calc";
import { Method } from "./controls";

export function DistortionMethod() {
  return (
    <Method>
      <p>
        <strong>At each depth.</strong> The mean diameter is the average of the readings; out-of-round is the largest diameter minus the
        smallest at that depth. Over the whole bore, taper is the largest mean minus the smallest mean, and top-to-bottom taper is the mean
        at the shallowest depth minus the mean at the deepest (positive: wider at the top).
      </p>
      <p>
        <strong>Lobes (orders).</strong> The shape around the bore is split into waves by a discrete Fourier fit: the radius is modelled as
        a mean plus a sum of waves A<sub>k</sub>·cos(k·(θ − φ<sub>k</sub>)), order 2 being oval, order 3 three-lobed, order 4 four-lobed. A
        <sub>k</sub> is the radial amplitude, φ<sub>k</sub> where its first high point is. The readings must be equally spaced; order k
        needs k + 1 angles over 180° with a two-point gauge, or 2k + 1 over 360° with radial readings.
      </p>
      <p id="two-point-note">
        <strong>Why a two-point gauge cannot see order 3.</strong> {TWO_POINT_GAUGE_NOTE} Put simply: a three-lobed bore has a high point
        opposite a low point everywhere, so the two anvils always span the same distance.
      </p>
      <p>
        <strong>Shape along the bore.</strong> With three or more depths, a middle mean more than 1 µm above the straight line from top to
        bottom is called barrel, more than 1 µm below it hourglass. The polar plots stretch the deviations from round by the factor printed
        on each plot; the dotted circle is the mean size. Method: discrete Fourier series, as in any text on roundness measurement (e.g. ISO
        12181-1 for the terms).
      </p>
    </Method>
  );
}

export function PreloadMethod() {
  return (
    <Method>
      <p>
        <strong>Nut factor.</strong> Torque equals the nut factor times the clamp load times the nominal diameter, T = K·F·d (Shigley's
        Mechanical Engineering Design, 9th ed., Eq. 8-27). K lumps thread and head friction together; the condition presets are Shigley's
        Table 8-15, except moly paste, which is worked out with the friction formula below at μ = 0.08 (VDI 2230 Part 1, Table A5).
      </p>
      <p>
        <strong>Friction coefficients.</strong> Torque is the clamp load times three lengths added together: the pitch over 2π (the part
        that stretches the bolt), the thread friction μth times the pitch diameter d2 over 2·cos 30°, and the head friction μhead times half
        the bearing diameter Db (ISO 16047 and VDI 2230). The result splits the torque into these three.
      </p>
      <p>
        <strong>Stress and yield.</strong> Stress is the clamp load over the tensile stress area As. For metric threads As = π/4·((d2 +
        d3)/2)² with d2 = d − 0.649519·P and d3 = d − 1.226869·P (ISO 724, ISO 898-1); for inch threads As = 0.7854·(D − 0.9743/n)² (ASME
        B1.1). The yield is the minimum of the ISO 898-1 class or SAE J429 grade for the size. Past 90 % of yield the result turns red:
        there is little margin left for the scatter of friction.
      </p>
      <p>
        <strong>Stretch.</strong> F·L/(As·E) over the grip length, as if the whole grip had the stress area: a simplification that ignores
        the plain shank, the thread run-out and the joint's own compression. Use it to compare, not to set a stretch spec.
      </p>
      <p>
        <strong>Bench readings.</strong> The effective K comes from the least-squares line through the origin, F = T/(K·d), fitted to the
        pairs; its ± is the standard deviation of each pair's own K = T/(F·d).
      </p>
    </Method>
  );
}

export function ClearanceMethod() {
  return (
    <Method>
      <p>
        <strong>Piston-to-wall.</strong> Cold clearance is the bore minus the piston, both measured at the same temperature, the piston at
        its gauge point. Hot, each part grows by its diameter times its expansion coefficient times its rise in temperature, ΔD = D·α·ΔT;
        the hot clearance is the grown bore minus the grown piston. The coefficients are mean values from the handbook named beside each
        material (ASM Handbook Vol. 1 and 2; Callister, Table B.6), taken over 20–100 °C. For the piston alloys the handbook also gives the
        means from 20 °C to 200 and 300 °C; between them the mean is interpolated, so a running piston at 200–300 °C is inside the figures.
        A part outside its material's range, or past where it begins to melt, is warned about. The model treats each part as one uniform
        temperature and a plain cylinder: real pistons are cam-ground and tapered, hotter at the crown than the skirt, so take the hot
        figure as a comparison between choices, never as the piston maker's clearance.
      </p>
      <p>
        <strong>Bearing oil clearance.</strong> The bearing bore (measured with the shells fitted and torqued, or the housing bore minus two
        shell walls) minus the journal. Shop guidance, common practice: about {OIL_CLEARANCE_RULE.perInchOfDiameter} in of clearance per
        inch of journal; it is shown for orientation only.
      </p>
      <p>
        <strong>Ring end gap.</strong> Recommended gap = bore in inches × the gap factor for the application, a rule of thumb (shop
        guidance). Without a spec, a measured gap is called within when it is at least the recommended gap and at most{" "}
        {Math.round((RING_GAP_BAND_FACTOR - 1) * 100)} % over it. A gap that is too small can butt when hot and break the ring or the land.
      </p>
    </Method>
  );
}
