import { describe, expect, it } from 'vitest';
import { assignInOrder } from '../../src/features/photos/components/bulk-upload';
import type { ShotListViewDto } from '../../src/features/photos/types';

const view = (key: string, position: number): ShotListViewDto => ({ key, label: key, hint: '', anchorKind: 'face', position });
const VIEWS = ['frontal-rest', 'frontal-smile', 'lips-rest', 'lips-pucker'].map(view);
const file = (name: string) => new File([new Uint8Array([0xff, 0xd8])], name, { type: 'image/jpeg' });

describe('assigning dropped files to views', () => {
  it('takes files in camera numbering order (numeric, not alphabetical) and views in shot-list order', () => {
    const out = assignInOrder([file('IMG_10.jpg'), file('IMG_9.jpg'), file('img_11.JPG')], VIEWS, new Set());
    expect(out.map((o) => [o.file.name, o.view])).toEqual([
      ['IMG_9.jpg', 'frontal-rest'],
      ['IMG_10.jpg', 'frontal-smile'],
      ['img_11.JPG', 'lips-rest'],
    ]);
  });

  it('fills empty views first, then offers retakes, and leaves extra files unassigned', () => {
    const out = assignInOrder(['a.jpg', 'b.jpg', 'c.jpg', 'd.jpg', 'e.jpg'].map(file), VIEWS, new Set(['frontal-rest', 'lips-rest']));
    expect(out.map((o) => o.view)).toEqual(['frontal-smile', 'lips-pucker', 'frontal-rest', 'lips-rest', '']);
  });
});
