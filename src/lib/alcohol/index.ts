export { AlcoholInputError } from './errors';
export {
  density,
  massFractionToVolPercent20,
  volPercentToMassFraction,
  alcoholmeterCorrection,
  ALCOHOLMETER_GLASS_EXPANSION_PER_K,
  OIML_T_MIN_C,
  OIML_T_MAX_C,
} from './oiml-r22';
export { laa, proofFromAbv, proofGallons, laaToProofGallons } from './yield';
