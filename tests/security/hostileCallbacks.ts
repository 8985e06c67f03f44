/** Every value tried as a return address; none may lead off the site. */
export const HOSTILE_CALLBACKS = [
  '/\\evil.example/x', '//evil.example/x', '///evil.example', '/\t/evil.example', '\\\\evil.example', 'https://evil.example/',
  'http:evil.example', 'javascript:alert(1)', 'JaVaScRiPt:alert(1)', 'data:text/html,<script>alert(1)</script>', '/%5Cevil.example',
  ' //evil.example', '/.//evil.example', 'https://127.0.0.1.evil.example/', 'https:/\\evil.example',
];
