# bash completion for breathbeat. The commands and options are read from the
# program's own --help at completion time, so they are never listed twice.
_breathbeat() {
  local cur path=() word help
  cur="${COMP_WORDS[COMP_CWORD]}"
  # The subcommand path typed so far: the words before the cursor that are not options.
  for word in "${COMP_WORDS[@]:1:COMP_CWORD-1}"; do
    case "$word" in
      -*) ;;
      *) help="$("${COMP_WORDS[0]}" "${path[@]}" "$word" --help 2>/dev/null)" && path+=("$word") ;;
    esac
  done
  help="$("${COMP_WORDS[0]}" "${path[@]}" --help 2>/dev/null)" || return 0
  local options subcommands
  options="$(printf '%s\n' "$help" | sed -n 's/^  \(-[^ ]*\).*/\1/p' | tr ',' '\n' | grep '^-' | sort -u)"
  subcommands="$(printf '%s\n' "$help" | sed -n '/^Subcommands:/,$ s/^  \([a-z][a-z-]*\) .*/\1/p')"
  if [[ "$cur" == -* ]]; then
    mapfile -t COMPREPLY < <(compgen -W "$options" -- "$cur")
  else
    mapfile -t COMPREPLY < <(compgen -W "$subcommands" -- "$cur")
    [ ${#COMPREPLY[@]} -eq 0 ] && mapfile -t COMPREPLY < <(compgen -f -- "$cur")
  fi
}
complete -o filenames -F _breathbeat breathbeat
