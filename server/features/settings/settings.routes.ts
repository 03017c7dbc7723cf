import type { Router } from 'express';
import { allow, currentUser, STAFF } from '../../auth/access.js';
import type { Deps } from '../../deps.js';
import { audit } from '../../lib/audit.js';
import { parsed, validate } from '../../lib/validate.js';
import { settingsUpdateSchema } from './settings.schemas.js';
import { getSettings, saveSettings } from './settings.service.js';

export function registerSettingsRoutes(r: Router, { db, config }: Deps): void {
  r.get('/api/settings', allow(...STAFF), async (_req, res) => {
    res.json(await getSettings(db, config));
  });

  const update = validate({ body: settingsUpdateSchema });
  r.patch('/api/settings', allow('admin'), update, async (req, res) => {
    const { body } = parsed(req, update);
    const saved = await saveSettings(db, config, body, currentUser(req).id);
    await audit(db, req, { action: 'settings.edit', targetType: 'settings', targetId: 'clinic', details: { fields: Object.keys(body) } });
    res.json(saved);
  });
}
