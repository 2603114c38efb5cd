// Interface formulas (Hecht, Optics, ch. 4; Born & Wolf, Principles of Optics, §1.5): kept under this name for
// existing imports; the code lives in crossings.ts, the single home of Snell/Fresnel.
export {
  brewsterAngleRad, cosTransmitted, criticalAngleRad, escapeConeFraction, fresnelAveraged, fresnelAveragedWithCosT,
  fresnelRp, fresnelRs,
} from './crossings'
