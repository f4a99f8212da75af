/** Point budget of the drawing preview stored with every result (results.preview). */
export const PREVIEW_POINTS = 3000;
