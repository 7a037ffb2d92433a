import type { ModelSettings, ModelSettingsVersion } from '@kinpath/contracts';
import { DEFAULT_MODEL_SETTINGS, MEAN_CENTRED_MODEL_SETTINGS } from '@kinpath/contracts';
import { BadRequestException, Injectable, NotFoundException } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource, EntityManager } from 'typeorm';
import type { AuditAction } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import type { User } from '../users/entities/user.entity';
import { ModelEvents } from './model-events';

/** Audit actions of the model settings; detail holds the settings, never student data. */
export const MODEL_SETTINGS_AUDIT = {
  changed: 'model.settings_changed',
  restored: 'model.settings_restored',
} as const;

type Actor = Pick<User, 'id' | 'email'>;

interface VersionRow {
  version: number;
  settings: Partial<ModelSettings>;
  created_at: Date;
  email: string | null;
  note: string | null;
  restored_from: number | null;
}

const SELECT_VERSIONS = `
  SELECT s.version, s.settings, s.created_at, u.email, s.note, s.restored_from
  FROM model_settings s LEFT JOIN users u ON u.id = s.created_by`;

const SETTING_KEYS = Object.keys(DEFAULT_MODEL_SETTINGS) as (keyof ModelSettings)[];

/**
 * Only the known settings, defaults for any a stored version lacks. A shape from before the
 * estimator settings (it has `center`) means the original method: its values fill the gaps,
 * and `center` off is centring none.
 */
export function completeSettings(
  stored: Partial<ModelSettings> & { center?: boolean },
): ModelSettings {
  const original = stored.center !== undefined && stored.centring === undefined;
  const out = {
    ...(original ? MEAN_CENTRED_MODEL_SETTINGS : DEFAULT_MODEL_SETTINGS),
    ...(original && stored.center === false ? { centring: 'none' } : {}),
  } as Record<keyof ModelSettings, unknown>;
  for (const key of SETTING_KEYS) if (stored[key] !== undefined) out[key] = stored[key];
  return out as unknown as ModelSettings;
}

function sameSettings(a: ModelSettings, b: ModelSettings): boolean {
  return SETTING_KEYS.every((key) => a[key] === b[key]);
}

function toVersion(row: VersionRow): ModelSettingsVersion {
  return {
    version: Number(row.version),
    settings: completeSettings(row.settings),
    createdAt: new Date(row.created_at).toISOString(),
    createdBy: row.email,
    note: row.note,
    restoredFrom: row.restored_from === null ? null : Number(row.restored_from),
  };
}

/**
 * The model settings as numbered versions: the latest version is in
 * force; a change or a restore appends a version, writes the audit trail in the
 * same transaction and then tells subscribers.
 */
@Injectable()
export class ModelSettingsService {
  /** The version in force; this process is the only writer of it, so it is kept here. */
  private cached: ModelSettingsVersion | null = null;

  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly audit: AuditService,
    private readonly events: ModelEvents,
  ) {}

  async current(): Promise<ModelSettingsVersion> {
    if (this.cached) return this.cached;
    const rows: VersionRow[] = await this.dataSource.query(
      `${SELECT_VERSIONS} ORDER BY s.version DESC LIMIT 1`,
    );
    if (!rows[0]) throw new Error('model_settings holds no version; the migrations did not run.');
    this.cached = toVersion(rows[0]);
    return this.cached;
  }

  async versions(): Promise<ModelSettingsVersion[]> {
    const rows: VersionRow[] = await this.dataSource.query(
      `${SELECT_VERSIONS} ORDER BY s.version DESC`,
    );
    return rows.map(toVersion);
  }

  /** A change; the same settings again keep the version in force (no empty versions). */
  async update(
    settings: ModelSettings,
    note: string | undefined,
    actor: Actor,
  ): Promise<ModelSettingsVersion> {
    const wanted = completeSettings(settings);
    if (wanted.minNeighbours > wanted.k) {
      throw new BadRequestException(
        `minNeighbours (${wanted.minNeighbours}) cannot exceed k (${wanted.k}): no neighbourhood could ever be large enough.`,
      );
    }
    return this.append(wanted, note?.trim() || null, null, actor);
  }

  async restore(version: number, actor: Actor): Promise<ModelSettingsVersion> {
    const rows: VersionRow[] = await this.dataSource.query(
      `${SELECT_VERSIONS} WHERE version = $1`,
      [version],
    );
    if (!rows[0]) throw new NotFoundException(`There is no model settings version ${version}.`);
    return this.append(
      completeSettings(rows[0].settings),
      `Restored version ${version}.`,
      version,
      actor,
    );
  }

  private async append(
    settings: ModelSettings,
    note: string | null,
    restoredFrom: number | null,
    actor: Actor,
  ): Promise<ModelSettingsVersion> {
    const saved = await this.dataSource.transaction(async (manager: EntityManager) => {
      // Serialises writers so version numbers stay consecutive.
      await manager.query(`SELECT pg_advisory_xact_lock(hashtext('kinpath:model-settings'))`);
      const latest: VersionRow[] = await manager.query(
        `${SELECT_VERSIONS} ORDER BY s.version DESC LIMIT 1`,
      );
      const previous = toVersion(latest[0]);
      if (sameSettings(previous.settings, settings)) return { version: previous, created: false };
      const inserted: { version: number }[] = await manager.query(
        `INSERT INTO model_settings (version, settings, created_by, note, restored_from)
         VALUES ($1, $2::jsonb, $3, $4, $5) RETURNING version`,
        [previous.version + 1, JSON.stringify(settings), actor.id, note, restoredFrom],
      );
      await this.audit.record(
        {
          actor,
          action: (restoredFrom === null
            ? MODEL_SETTINGS_AUDIT.changed
            : MODEL_SETTINGS_AUDIT.restored) as unknown as AuditAction,
          target: `model_settings:${inserted[0].version}`,
          detail: {
            version: inserted[0].version,
            previousVersion: previous.version,
            restoredFrom,
            settings,
            note,
          },
        },
        manager,
      );
      const rows: VersionRow[] = await manager.query(`${SELECT_VERSIONS} WHERE version = $1`, [
        inserted[0].version,
      ]);
      return { version: toVersion(rows[0]), created: true };
    });
    this.cached = saved.version;
    if (saved.created) this.events.publishSettings(saved.version);
    return saved.version;
  }
}
