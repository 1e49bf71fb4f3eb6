import type { RolloverPlan, RolloverRequest, RolloverResult } from '@shared/schemas/course-rollover'
import { http } from './http'

export const previewRollover = (courseId: number, body: RolloverRequest) =>
  http<RolloverPlan>('POST', `/api/courses/${courseId}/rollover/preview`, body)
export const confirmRollover = (courseId: number, body: RolloverRequest) =>
  http<RolloverResult>('POST', `/api/courses/${courseId}/rollover`, body)
