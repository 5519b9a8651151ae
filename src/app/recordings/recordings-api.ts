import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type { Observable } from 'rxjs';
import type { RecordingDetail, RecordingListResponse, RecordingPatch } from '../../../shared/api/recordings';

export interface RecordingQuery {
  page: number;
  pageSize: number;
  sort: string;
  dir: 'asc' | 'desc';
  q: string;
}

/** /api/recordings calls (the answers are the plain interfaces of shared/api/recordings). */
@Injectable({ providedIn: 'root' })
export class RecordingsApi {
  private readonly http = inject(HttpClient);

  list(q: RecordingQuery): Observable<RecordingListResponse> {
    const params = new HttpParams({ fromObject: { page: q.page, pageSize: q.pageSize, sort: q.sort, dir: q.dir, q: q.q } });
    return this.http.get<RecordingListResponse>('/api/recordings', { params });
  }
  get(id: number): Observable<RecordingDetail> {
    return this.http.get<RecordingDetail>(`/api/recordings/${id}`);
  }
  patch(id: number, body: RecordingPatch): Observable<RecordingDetail> {
    return this.http.patch<RecordingDetail>(`/api/recordings/${id}`, body);
  }
  remove(id: number): Observable<unknown> {
    return this.http.delete(`/api/recordings/${id}`);
  }
  reinspect(id: number): Observable<RecordingDetail> {
    return this.http.post<RecordingDetail>(`/api/recordings/${id}/inspect`, {});
  }
}
