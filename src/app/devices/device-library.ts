import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject, signal } from '@angular/core';
import {
  deviceDetail,
  deviceLibraryAccess,
  deviceList,
  deviceSummary,
  deviceUsage,
  deviceVersion,
  deviceVersionList,
  importPreview,
  importResult,
  type CreateDeviceBody,
  type DeviceCategory,
  type DeviceDetail,
  type DeviceLibraryAccess,
  type DeviceSummary,
  type DeviceUsage,
  type DeviceVersion,
  type DEVICE_ARCHIVE_FILTERS,
  type ImportConfirmBody,
  type ImportPreview,
  type ImportPreviewBody,
  type ImportResult,
  type UpdateDeviceBody,
} from '../../../shared/api/devices.js';
import { completed, parsed } from '../http/parse-response';

const BASE = '/api/devices';

export interface DeviceFilter {
  readonly search?: string;
  readonly category?: DeviceCategory | null;
  /** Default: active records only. */
  readonly archived?: (typeof DEVICE_ARCHIVE_FILTERS)[number];
}

function deviceUrl(deviceId: string): string {
  return `${BASE}/${encodeURIComponent(deviceId)}`;
}

/** The site-wide device library as the client sees it: the listed records and every call to the API. */
@Injectable({ providedIn: 'root' })
export class DeviceLibrary {
  private readonly http = inject(HttpClient);
  private readonly listed = signal<readonly DeviceSummary[]>([]);
  private readonly allowed = signal<DeviceLibraryAccess>({ canRead: false, canEdit: false });

  readonly devices = this.listed.asReadonly();
  readonly access = this.allowed.asReadonly();
  /** Where the browser downloads the library as CSV. */
  readonly exportUrl = `${BASE}/export`;

  async loadAccess(): Promise<DeviceLibraryAccess> {
    const access = await parsed(`GET ${BASE}/access`, this.http.get(`${BASE}/access`), deviceLibraryAccess);
    this.allowed.set(access);
    return access;
  }

  /** Loads the list shown by the library page. */
  async load(filter: DeviceFilter = {}): Promise<void> {
    this.listed.set(await this.search(filter));
  }

  /**
   * Searches without changing the page's list (the picker uses this). Archived records are left out
   * unless asked for, except when ids are given (the records a model links to).
   */
  async search(filter: DeviceFilter & { ids?: readonly string[] }): Promise<DeviceSummary[]> {
    let params = new HttpParams();
    if (filter.search?.trim()) params = params.set('search', filter.search.trim());
    if (filter.category) params = params.set('category', filter.category);
    if (filter.archived) params = params.set('archived', filter.archived);
    if (filter.ids) params = params.set('ids', filter.ids.join(','));
    return parsed(`GET ${BASE}`, this.http.get(BASE, { params }), deviceList);
  }

  get(deviceId: string): Promise<DeviceDetail> {
    return parsed(`GET ${deviceUrl(deviceId)}`, this.http.get(deviceUrl(deviceId)), deviceDetail);
  }

  versions(deviceId: string): Promise<DeviceVersion[]> {
    const url = `${deviceUrl(deviceId)}/versions`;
    return parsed(`GET ${url}`, this.http.get(url), deviceVersionList);
  }

  version(deviceId: string, version: number): Promise<DeviceVersion> {
    const url = `${deviceUrl(deviceId)}/versions/${version}`;
    return parsed(`GET ${url}`, this.http.get(url), deviceVersion);
  }

  /** Which models (drafts, revisions) and events of the projects the user may read link to the record. */
  usage(deviceId: string): Promise<DeviceUsage> {
    const url = `${deviceUrl(deviceId)}/usage`;
    return parsed(`GET ${url}`, this.http.get(url), deviceUsage);
  }

  async archive(deviceId: string): Promise<DeviceDetail> {
    const url = `${deviceUrl(deviceId)}/archive`;
    const saved = await parsed(`POST ${url}`, this.http.post(url, {}), deviceDetail);
    this.listed.update((list) => list.filter((item) => item.id !== deviceId));
    return saved;
  }

  async restore(deviceId: string): Promise<DeviceDetail> {
    const url = `${deviceUrl(deviceId)}/restore`;
    const saved = await parsed(`POST ${url}`, this.http.post(url, {}), deviceDetail);
    this.replace(saved);
    return saved;
  }

  /** Deletes a record no model links to (409 with the models that do, otherwise). */
  async remove(deviceId: string): Promise<void> {
    await completed(this.http.delete(deviceUrl(deviceId)));
    this.listed.update((list) => list.filter((item) => item.id !== deviceId));
  }

  async create(body: CreateDeviceBody): Promise<DeviceDetail> {
    const created = await parsed(`POST ${BASE}`, this.http.post(BASE, body), deviceDetail);
    this.replace(created);
    return created;
  }

  async update(deviceId: string, body: UpdateDeviceBody): Promise<DeviceDetail> {
    const saved = await parsed(`PUT ${deviceUrl(deviceId)}`, this.http.put(deviceUrl(deviceId), body), deviceDetail);
    this.replace(saved);
    return saved;
  }

  previewImport(body: ImportPreviewBody): Promise<ImportPreview> {
    return parsed(`POST ${BASE}/import/preview`, this.http.post(`${BASE}/import/preview`, body), importPreview);
  }

  confirmImport(body: ImportConfirmBody): Promise<ImportResult> {
    return parsed(`POST ${BASE}/import/confirm`, this.http.post(`${BASE}/import/confirm`, body), importResult);
  }

  async uploadEvidence(deviceId: string, file: File, description: string): Promise<DeviceDetail> {
    const form = new FormData();
    form.append('description', description);
    form.append('file', file, file.name);
    const url = `${deviceUrl(deviceId)}/evidence`;
    const saved = await parsed(`POST ${url}`, this.http.post(url, form), deviceDetail);
    this.replace(saved);
    return saved;
  }

  async removeEvidence(deviceId: string, evidenceId: string): Promise<void> {
    await completed(this.http.delete(this.evidenceUrl(deviceId, evidenceId)));
  }

  /** Where the browser downloads a file (a plain link: the session cookie goes with it). */
  evidenceUrl(deviceId: string, evidenceId: string): string {
    return `${deviceUrl(deviceId)}/evidence/${encodeURIComponent(evidenceId)}`;
  }

  private replace(saved: DeviceDetail): void {
    const summary = deviceSummary.parse(saved);
    this.listed.update((list) =>
      list.some((item) => item.id === saved.id) ? list.map((item) => (item.id === saved.id ? summary : item)) : [...list, summary],
    );
  }
}
