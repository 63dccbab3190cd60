/** The usual cautions for running a still, shown where runs are planned and run. */
export const SAFETY_CAUTIONS: readonly string[] = [
  'Never leave a running still unattended.',
  'Keep the still room ventilated: ethanol vapour is flammable and heavier than air.',
  'No open flame, sparks or unrated electrics near vapour or spirit.',
  'Check the pressure relief and that the condenser water is flowing before applying heat.',
  'Discard the heads: the first fraction carries methanol and other volatiles.',
  'Follow your licence, local codes and your own safe-operating procedures; they take precedence over this board.',
];
