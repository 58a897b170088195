import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import type {
  AuditEntryView,
  AuditVerification,
  Comparison,
  RecommendationView,
  ResilienceView,
  RunStatus,
  RunSummary,
  RunView,
  ScenarioInput,
  ScenarioView,
  SensitivityView,
} from '@shared/evaluation';
import type { DebriefView, ExplanationView } from '@shared/explanation';
import type { BidsAnswer, TenderView } from '@shared/tenders';
import { Observable, map } from 'rxjs';
import { API_BASE_URL } from '../core/http/api-base-url';

/**
 * The evaluation calls of buyers and compliance on a closed tender: scenarios, runs, comparison,
 * resilience, the recommendation and the audit trail. The tender and its bids are read here too
 * (rather than through the tenders area) so the award screens depend only on the shared contract.
 */
@Injectable({ providedIn: 'root' })
export class AwardApi {
  private readonly http = inject(HttpClient);
  private readonly base = inject(API_BASE_URL);

  tender(tenderId: string): Observable<TenderView> {
    return this.http.get<TenderView>(this.tenderUrl(tenderId));
  }

  /** The vendors with a submitted bid (known only after closing). */
  bidders(tenderId: string): Observable<{ id: string; name: string; sme: boolean }[]> {
    return this.http
      .get<BidsAnswer>(`${this.tenderUrl(tenderId)}/bids`)
      .pipe(map((answer) => ('bids' in answer ? answer.bids.map((bid) => bid.vendor) : [])));
  }

  scenarios(tenderId: string): Observable<ScenarioView[]> {
    return this.http.get<ScenarioView[]>(`${this.tenderUrl(tenderId)}/scenarios`);
  }

  createScenario(tenderId: string, scenario: ScenarioInput): Observable<ScenarioView> {
    return this.http.post<ScenarioView>(`${this.tenderUrl(tenderId)}/scenarios`, scenario);
  }

  updateScenario(scenarioId: string, scenario: ScenarioInput): Observable<ScenarioView> {
    return this.http.put<ScenarioView>(`${this.base}/scenarios/${encodeURIComponent(scenarioId)}`, scenario);
  }

  /** Queues a solve; the answer comes back at once (202) and the run is then polled. */
  startRun(scenarioId: string): Observable<{ id: string; status: RunStatus }> {
    return this.http.post<{ id: string; status: RunStatus }>(`${this.base}/scenarios/${encodeURIComponent(scenarioId)}/runs`, {});
  }

  /** Newest first. */
  runs(tenderId: string): Observable<RunSummary[]> {
    return this.http.get<RunSummary[]>(`${this.tenderUrl(tenderId)}/runs`);
  }

  run(runId: string): Observable<RunView> {
    return this.http.get<RunView>(this.runUrl(runId));
  }

  cancelRun(runId: string): Observable<RunSummary> {
    return this.http.post<RunSummary>(`${this.runUrl(runId)}/cancel`, {});
  }

  /** A plain link: the browser downloads the workbook with the session cookie. */
  exportUrl(runId: string): string {
    return `${this.runUrl(runId)}/export.xlsx`;
  }

  compare(tenderId: string, runIds: readonly string[]): Observable<Comparison> {
    const params = new HttpParams().set('runs', runIds.join(','));
    return this.http.get<Comparison>(`${this.tenderUrl(tenderId)}/compare`, { params });
  }

  /** Queues one re-solve per awarded vendor, each without that vendor. */
  checkResilience(runId: string): Observable<{ queued: number }> {
    return this.http.post<{ queued: number }>(`${this.runUrl(runId)}/resilience`, {});
  }

  resilience(runId: string): Observable<ResilienceView> {
    return this.http.get<ResilienceView>(`${this.runUrl(runId)}/resilience`);
  }

  /** Why each region went where it did, and the debriefs asked for so far (status 'not-started' until asked for). */
  explanation(runId: string): Observable<ExplanationView> {
    return this.http.get<ExplanationView>(`${this.runUrl(runId)}/explanation`);
  }

  /** Asks for the explanation (queued on the solve queue; answered with its state). */
  explain(runId: string): Observable<ExplanationView> {
    return this.http.post<ExplanationView>(`${this.runUrl(runId)}/explanation`, {});
  }

  /** Asks for one vendor's debrief of the run (queued on the solve queue; cached per run and vendor; shown in `explanation().debriefs`). */
  debrief(runId: string, vendorId: string): Observable<DebriefView> {
    return this.http.post<DebriefView>(`${this.runUrl(runId)}/debrief/${encodeURIComponent(vendorId)}`, {});
  }

  /** Asks for one region of a done explanation to be worked out exactly (queued; shown in `explanation().regionChecks` and laid over its region). */
  exactRegion(runId: string, region: string): Observable<ExplanationView> {
    return this.http.post<ExplanationView>(`${this.runUrl(runId)}/explanation/regions/${encodeURIComponent(region)}`, {});
  }

  /** Queues the forecast sensitivity re-solves (all regions, or one region alone); cached per run. */
  startSensitivity(runId: string, regionCode?: string): Observable<{ queued: number }> {
    return this.http.post<{ queued: number }>(`${this.runUrl(runId)}/sensitivity`, regionCode ? { regionCode } : {});
  }

  sensitivity(runId: string): Observable<SensitivityView> {
    return this.http.get<SensitivityView>(`${this.runUrl(runId)}/sensitivity`);
  }

  /** The bid tabulation (after closing: every bid with its compliance check). */
  bids(tenderId: string): Observable<BidsAnswer> {
    return this.http.get<BidsAnswer>(`${this.tenderUrl(tenderId)}/bids`);
  }

  /** The latest recommendation, and the earlier rounds (each returned by compliance), newest first. */
  recommendation(tenderId: string): Observable<{ recommendation: RecommendationView | null; history: RecommendationView[] }> {
    return this.http.get<{ recommendation: RecommendationView | null; history: RecommendationView[] }>(this.recommendationUrl(tenderId));
  }

  recommend(tenderId: string, runId: string, justification: string): Observable<RecommendationView> {
    return this.http.post<RecommendationView>(this.recommendationUrl(tenderId), { runId, justification });
  }

  approve(tenderId: string, comment: string): Observable<RecommendationView> {
    return this.http.post<RecommendationView>(`${this.recommendationUrl(tenderId)}/approve`, { comment });
  }

  /** Sends the recommendation back to the buyer; the comment is required. */
  returnRecommendation(tenderId: string, comment: string): Observable<RecommendationView> {
    return this.http.post<RecommendationView>(`${this.recommendationUrl(tenderId)}/return`, { comment });
  }

  audit(tenderId: string): Observable<AuditEntryView[]> {
    return this.http.get<AuditEntryView[]>(`${this.tenderUrl(tenderId)}/audit`);
  }

  verifyAudit(tenderId: string): Observable<AuditVerification> {
    return this.http.get<AuditVerification>(`${this.tenderUrl(tenderId)}/audit/verify`);
  }

  auditCsvUrl(tenderId: string): string {
    return `${this.tenderUrl(tenderId)}/audit.csv`;
  }

  private tenderUrl(id: string): string {
    return `${this.base}/tenders/${encodeURIComponent(id)}`;
  }

  private runUrl(id: string): string {
    return `${this.base}/runs/${encodeURIComponent(id)}`;
  }

  private recommendationUrl(tenderId: string): string {
    return `${this.tenderUrl(tenderId)}/recommendation`;
  }
}
