'use client';
/**
 * The entry's three drop areas (G-code, photos, slicer settings or project file), shared by the
 * new-entry form and the draft's file replacement: the same limits and sentences as the server
 * (lib/entries/fileLimits.ts).
 */
import { FileDrop } from './FileDrop';
import {
  GCODE_EXTENSIONS, GCODE_MAX_BYTES, PHOTO_EXTENSIONS, PHOTO_MAX_BYTES, PHOTO_MAX_COUNT, PHOTO_MIME_TYPES, PROJECT_MAX_BYTES,
  gcodeFileProblem, photoCountProblem, photoFileProblem, projectFileProblem,
} from '@/lib/entries/fileLimits';

const MB = 1024 * 1024;
export const GCODE_ACCEPT = [...GCODE_EXTENSIONS.filter((e) => e.split('.').length === 2), 'text/plain', 'application/gzip', 'application/x-gzip'].join(',');
export const PHOTO_ACCEPT = [...PHOTO_MIME_TYPES, ...PHOTO_EXTENSIONS].join(',');

interface DropProps {
  id: string;
  label?: string;
  files: File[];
  onFiles: (files: File[]) => void;
  error?: string;
  disabled?: boolean;
  hint?: React.ReactNode;
}

export function GcodeDrop({ id, label = `G-code (.gcode or .gcode.gz, up to ${GCODE_MAX_BYTES / MB} MB)`, ...rest }: DropProps) {
  return <FileDrop id={id} label={label} what="the G-code" accept={GCODE_ACCEPT} check={gcodeFileProblem} testId={`${id}-drop`} {...rest} />;
}

export function PhotosDrop({ id, label, ...rest }: DropProps & { label: string }) {
  return (
    <FileDrop
      id={id}
      label={label}
      what="photos"
      multiple
      thumbnails
      accept={PHOTO_ACCEPT}
      check={photoFileProblem}
      countProblem={photoCountProblem}
      testId={`${id}-drop`}
      {...rest}
      hint={<>Up to {PHOTO_MAX_BYTES / MB} MB each, at most {PHOTO_MAX_COUNT}. {rest.hint}</>}
    />
  );
}

export function ProjectDrop({ id, label = `Slicer settings or project file (optional, up to ${PROJECT_MAX_BYTES / MB} MB)`, ...rest }: DropProps) {
  return <FileDrop id={id} label={label} what="the file" check={projectFileProblem} testId={`${id}-drop`} {...rest} />;
}
