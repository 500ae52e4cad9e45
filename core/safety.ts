/**
 * The laser-safety reminder shown on every start (physics notes §6). Plain text, shared by every shell.
 * It defers to local rules and the site's laser safety officer; it does not replace them.
 */
export const SAFETY_TITLE = 'Laser safety';

export const SAFETY_POINTS: readonly string[] = [
  'Lasers of classes 3R, 3B and 4 (IEC 60825-1) can injure the eye before the blink reflex acts. Wear eye protection rated for the wavelength and the power of this laser.',
  'Keep the beam below eye level and block stray beams.',
  'The metal disc or steel ball in the beam reflects light in unexpected directions: enclose or block those reflections.',
  'Attenuate the beam before the camera; a focused or strong beam damages the sensor.',
  "Your site's rules and its laser safety officer take precedence over anything this program says.",
];

export function safetyText(): string {
  return [`${SAFETY_TITLE}:`, ...SAFETY_POINTS.map((p) => `  • ${p}`)].join('\n');
}
