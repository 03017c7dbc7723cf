/**
 * Public photographs used as outside references by the media tests.
 * - The NASA astronaut portrait (public domain), shipped by Debian's python3-skimage.
 * - dlib's example faces: Debian's libdlib19.1 ships them in its documentation folder with 68-point XML files whose
 *   points come from dlib's own 68-point model (a second opinion, not ground truth). Debian's copyright file lists
 *   `examples/*` as "Creative-Commons-Public-Domain"; the photos themselves are from the PASCAL VOC 2011 set. `.ci/run`
 *   unpacks the package into `DLIB_FACES_DIR` (default /tmp/twinframe-dlib-faces) when the documentation is missing.
 */
import fs from 'node:fs';
import path from 'node:path';
import type { Point } from '../../server/media/umeyama.js';

export const ASTRONAUT = '/usr/lib/python3/dist-packages/skimage/data/astronaut.png';

const DLIB_DOC = 'usr/share/doc/libdlib19.1/examples/faces';
/** Where dlib's example faces are: the installed documentation, or the folder .ci/run unpacks the package into. */
export function dlibFacesDir(): string | null {
  const dirs = [path.join('/', DLIB_DOC), path.join(process.env.DLIB_FACES_DIR ?? '/tmp/twinframe-dlib-faces', DLIB_DOC)];
  return dirs.find((d) => fs.existsSync(path.join(d, 'testing_with_face_landmarks.xml'))) ?? null;
}

export interface DlibFace {
  file: string;
  box: { x: number; y: number; width: number; height: number };
  points: Point[];
}

/** Every face of dlib's two example landmark files (training and testing), 68 points each. */
export function dlibFaces(dir: string): DlibFace[] {
  const out: DlibFace[] = [];
  for (const f of ['training_with_face_landmarks.xml', 'testing_with_face_landmarks.xml']) {
    const xml = fs.readFileSync(path.join(dir, f), 'latin1');
    for (const im of xml.matchAll(/<image file='([^']+)'[^>]*>([\s\S]*?)<\/image>/g)) {
      for (const b of im[2].matchAll(/<box top='(\d+)' left='(\d+)' width='(\d+)' height='(\d+)'>([\s\S]*?)<\/box>/g)) {
        const points = [...b[5].matchAll(/<part name='(\d+)' x='(-?\d+)' y='(-?\d+)'\/>/g)]
          .sort((p, q) => Number(p[1]) - Number(q[1]))
          .map((m) => [Number(m[2]), Number(m[3])] as Point);
        out.push({ file: path.join(dir, im[1]), box: { x: +b[2], y: +b[1], width: +b[3], height: +b[4] }, points });
      }
    }
  }
  return out;
}
