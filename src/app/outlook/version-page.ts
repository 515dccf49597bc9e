import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { ACCESS } from '../core/access';
import { errorMessage, errorStatus } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { ExpectationsTable } from './expectations-table';
import { OutlookCautions } from './outlook-cautions';
import { formatDateTime } from './outlook-format';
import type { FullVersion, VersionSummary } from './outlook-api-types';
import { ProjectionReport } from './projection-report';
import { SourceFacts } from './source-facts';
import { LoadProblem } from '../shared/load-problem';

/** `/outlook/:id/versions/:versionId`: a published version, read-only, with every farm. */
@Component({
  selector: 'np-version-page',
  imports: [RouterLink, MatAnchor, MatButton, MatIcon, MatProgressBar, ExpectationsTable, OutlookCautions, ProjectionReport, SourceFacts, LoadProblem],
  templateUrl: './version-page.html',
  styleUrl: './version-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VersionPage {
  readonly #auth = inject(AuthStore);

  // inputs
  /** Route parameters. */
  readonly id = input.required<string>();
  readonly versionId = input.required<string>();

  protected readonly version = httpResource<FullVersion>(() => `/api/outlooks/versions/${encodeURIComponent(this.versionId())}`);
  protected readonly versions = httpResource<VersionSummary[]>(() => `/api/outlooks/${encodeURIComponent(this.id())}/versions`);
  protected readonly v = computed(() => (this.version.hasValue() ? this.version.value() : null));
  protected readonly others = computed(() => (this.versions.hasValue() ? this.versions.value() : []));
  protected readonly notFound = computed(() => errorStatus(this.version.error()) === 404);
  protected readonly problem = computed(() => (this.version.error() && !this.notFound() ? errorMessage(this.version.error()) : null));
  protected readonly canWrite = computed(() => this.#auth.hasRole(ACCESS.outlookWrite));
  protected readonly canReadLog = computed(() => this.#auth.hasRole(ACCESS.outlookLog));
  protected readonly formatDateTime = formatDateTime;
}
