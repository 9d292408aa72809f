export function Logo({ className = "h-8 w-8" }: { className?: string }) {
  return (
    <svg viewBox="0 0 64 64" className={className} aria-hidden="true">
      <rect width="64" height="64" rx="14" fill="#1F5F5B" />
      <path d="M10 50V38h9v-8h9v-14h8v8h9v12h9v14z" fill="#F7F4EE" />
      <path d="M28 16h8v8h-8z" fill="#B5523B" />
    </svg>
  );
}
