import type {
  CourseStructure,
  ExtensionInput,
  ExtensionOverview,
  LabGroupCreate,
  LabGroupUpdate,
  Placement,
  SectionCreate,
  SectionUpdate,
} from '@shared/schemas/course-admin'
import { http } from './http'

const base = (courseId: number) => `/api/courses/${courseId}`

export const fetchCourseStructure = (courseId: number) => http<CourseStructure>('GET', `${base(courseId)}/sections`)
export const postSection = (courseId: number, body: SectionCreate) =>
  http<CourseStructure>('POST', `${base(courseId)}/sections`, body)
export const patchSection = (courseId: number, sectionId: number, body: SectionUpdate) =>
  http<CourseStructure>('PATCH', `${base(courseId)}/sections/${sectionId}`, body)
export const deleteSection = (courseId: number, sectionId: number) =>
  http<CourseStructure>('DELETE', `${base(courseId)}/sections/${sectionId}`)
export const postLabGroup = (courseId: number, body: LabGroupCreate) =>
  http<CourseStructure>('POST', `${base(courseId)}/lab-groups`, body)
export const patchLabGroup = (courseId: number, labGroupId: number, body: LabGroupUpdate) =>
  http<CourseStructure>('PATCH', `${base(courseId)}/lab-groups/${labGroupId}`, body)
export const deleteLabGroup = (courseId: number, labGroupId: number) =>
  http<CourseStructure>('DELETE', `${base(courseId)}/lab-groups/${labGroupId}`)
export const patchPlacement = (courseId: number, userId: number, body: Placement) =>
  http<void>('PATCH', `${base(courseId)}/roster/${userId}`, body)
export const deleteMember = (courseId: number, userId: number) =>
  http<void>('DELETE', `${base(courseId)}/roster/${userId}`)
export const fetchExtensions = (courseId: number) => http<ExtensionOverview>('GET', `${base(courseId)}/extensions`)
export const putExtension = (courseId: number, moduleId: number, userId: number, body: ExtensionInput) =>
  http<ExtensionOverview>('PUT', `${base(courseId)}/extensions/${moduleId}/${userId}`, body)
export const deleteExtension = (courseId: number, moduleId: number, userId: number) =>
  http<ExtensionOverview>('DELETE', `${base(courseId)}/extensions/${moduleId}/${userId}`)
