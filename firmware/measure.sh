#!/usr/bin/env bash
# Figures for docs/performance.md: instructions per call counted in QEMU, and
# image sizes. Run from anywhere: bash firmware/measure.sh
# Needs qemu-system-arm, python3 and the llvm-tools rustup component.
set -euo pipefail
cd "$(dirname "$0")"

tools="$(rustc --print sysroot)/lib/rustlib/x86_64-unknown-linux-gnu/bin"
trace="$(mktemp)"
trap 'rm -f "$trace"' EXIT

declare -A cpu=([thumbv7em-none-eabihf]="cortex-m4 -machine mps2-an386" [thumbv6m-none-eabi]="cortex-m0 -machine microbit")
declare -A core=([thumbv7em-none-eabihf]="Cortex-M4F" [thumbv6m-none-eabi]="Cortex-M0")

# Measurement names: the `// N: text` comments in src/bin/count.rs.
names="$(grep -oE '^ *// [0-9]+: .*' src/bin/count.rs | sed -E 's/^ *\/\/ //')"

echo "### Instructions per call (QEMU 7.2 -singlestep, release build, opt-level 3, LTO)"
echo
echo "| measurement | ${core[thumbv7em-none-eabihf]} | ${core[thumbv6m-none-eabi]} |"
echo "|---|---:|---:|"
declare -A counts
declare -A order
for target in thumbv7em-none-eabihf thumbv6m-none-eabi; do
    cargo build -q --release --target "$target" --bin count
    # shellcheck disable=SC2086
    timeout 300 qemu-system-arm -cpu ${cpu[$target]} -nographic -semihosting-config enable=on,target=native \
        -singlestep -d exec,cpu,nochain -D "$trace" -kernel "target/$target/release/count"
    while read -r id n; do
        counts["$target/$id"]="${counts["$target/$id"]:+${counts["$target/$id"]}, }$n"
    done < <(python3 tools/count_instructions.py "$trace")
    # A second run must give the same counts (repeatability).
    first="$(python3 tools/count_instructions.py "$trace")"
    # shellcheck disable=SC2086
    timeout 300 qemu-system-arm -cpu ${cpu[$target]} -nographic -semihosting-config enable=on,target=native \
        -singlestep -d exec,cpu,nochain -D "$trace" -kernel "target/$target/release/count"
    second="$(python3 tools/count_instructions.py "$trace")"
    if [ "$first" != "$second" ]; then
        echo "counts differ between two runs on $target" >&2
        exit 1
    fi
done
while IFS= read -r line; do
    id="${line%%:*}"
    echo "| ${line#*: } | ${counts["thumbv7em-none-eabihf/$id"]:-–} | ${counts["thumbv6m-none-eabi/$id"]:-–} |"
done <<< "$names"
echo
echo "### Image sizes (llvm-size -A; flash = .vector_table + .text + .rodata + .data, RAM = .data + .bss + .uninit)"
echo
echo "| image | core | flash bytes | static RAM bytes |"
echo "|---|---|---:|---:|"
# flash and RAM of one image: "flash ram"
image_size() {
    "$tools/llvm-size" -A "$1" | awk '
        $1 == ".vector_table" || $1 == ".text" || $1 == ".rodata" { flash += $2 }
        $1 == ".data" { flash += $2; ram += $2 }
        $1 == ".bss" || $1 == ".uninit" { ram += $2 }
        END { printf "%d %d\n", flash, ram }'
}
for target in thumbv7em-none-eabihf thumbv6m-none-eabi; do
    for bin in nopanic count; do
        cargo build -q --release --target "$target" --bin "$bin"
        read -r flash ram < <(image_size "target/$target/release/$bin")
        echo "| $bin | ${core[$target]} | $flash | $ram |"
    done
done
echo
echo "### Footprint per feature set (minimal images without printing, minus the footprint_base image)"
echo
echo "Each image checks a parameter set at start-up (SafetyParams::new, with the speed-ceiling solve), then ticks."
echo
echo "| image | core | profile | flash bytes above base | static RAM bytes |"
echo "|---|---|---|---:|---:|"
for target in thumbv7em-none-eabihf thumbv6m-none-eabi; do
    for profile in release release-size; do
        cargo build -q --profile "$profile" --target "$target" --bin footprint_base
        read -r base _ < <(image_size "target/$target/$profile/footprint_base")
        for bin in footprint_interlock footprint_fixed; do
            cargo build -q --profile "$profile" --target "$target" --bin "$bin"
            read -r flash ram < <(image_size "target/$target/$profile/$bin")
            echo "| $bin | ${core[$target]} | $profile | $((flash - base)) | $ram |"
        done
    done
done
echo
echo "### State struct sizes (core::mem::size_of, printed by the checks image)"
echo
echo "| type | Cortex-M4F bytes | Cortex-M0 bytes |"
echo "|---|---:|---:|"
declare -A sizes
for target in thumbv7em-none-eabihf thumbv6m-none-eabi; do
    while read -r _ name _ n; do
        sizes["$target/$name"]="$n"
        order["$name"]=1
    done < <(cargo run -q --release --target "$target" --bin checks 2>/dev/null | grep '^size_of ')
done
cargo run -q --release --target thumbv7em-none-eabihf --bin checks 2>/dev/null | grep '^size_of ' | while read -r _ name _ _; do
    echo "| $name | ${sizes["thumbv7em-none-eabihf/$name"]} | ${sizes["thumbv6m-none-eabi/$name"]} |"
done
